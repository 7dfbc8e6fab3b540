import { OWNER_ONLY } from '../../shared/roles';
import type { RouteDef } from '../http/route-table';
import { requestDesign } from '../services/engine/designs';

/**
 * The option designer on the server: the owner's search (input and output of `npm run design`) in the
 * compute pool. The design page runs the same search in a Web Worker; this path serves scripts and
 * searches too large for a browser.
 */
export function designRoutes(): RouteDef[] {
  return [
    {
      method: 'post', path: '/api/designs/search', allow: OWNER_ONLY,
      handler: async (req, res) => {
        // The client going away (closed tab, cancelled fetch) stops the search at its next candidate.
        const gone = new AbortController();
        res.on('close', () => { if (!res.writableFinished) gone.abort(); });
        const result = await requestDesign(req.body, gone.signal);
        if (!gone.signal.aborted) res.json(result);
      },
    },
  ];
}
