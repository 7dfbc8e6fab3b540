import type { Knex } from 'knex';
import { quoteSchema } from '../../shared/schemas/orders';
import { parseWith } from '../errors';
import type { RouteDef } from '../http/route-table';
import { priceCart } from '../services/orders/pricing';

export function shopRoutes(knex: Knex): RouteDef[] {
  return [
    // The cart asks the server for every amount it shows; the order is priced again when placed.
    { method: 'post', path: '/api/shop/quote', allow: 'public', handler: async (req, res) => res.json(await priceCart(knex, parseWith(quoteSchema, req.body))) },
  ];
}
