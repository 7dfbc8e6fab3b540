import type { RouteDef } from '../http/route-table';
import { computeContractProfile } from '../services/engine/profiles';

export function profileRoutes(): RouteDef[] {
  return [
    { method: 'post', path: '/api/profiles', allow: 'signed-in', handler: (req, res) => res.json(computeContractProfile(req.body)) },
  ];
}
