import type { Config } from '../config';
import { notFound } from '../errors';
import type { RouteDef } from '../http/route-table';
import * as inbox from '../services/mail/inbox';

import { PLANNING } from '../../shared/roles';

// The staff inbox: owner and planner read what Kneepoint sent (the mail fake's messages locally).

export function mailRoutes(config: Config): RouteDef[] {
  const base = config.MAIL_INBOX_URL;
  return [
    {
      method: 'get', path: '/api/mail/messages', allow: PLANNING,
      handler: async (req, res) => res.json({ messages: await inbox.listMessages(base, typeof req.query.to === 'string' ? req.query.to : undefined) }),
    },
    { method: 'get', path: '/api/mail/messages/:id', allow: PLANNING, handler: async (req, res) => res.json({ message: await inbox.getMessage(base, String(req.params.id)) }) },
    {
      method: 'get', path: '/api/mail/messages/:id/attachments/:index', allow: PLANNING,
      handler: async (req, res) => {
        // A position in the message (0-based), not a row id: plain digits, bounded.
        if (!/^\d{1,3}$/.test(String(req.params.index))) throw notFound('No such attachment');
        const index = Number(req.params.index);
        const file = await inbox.getAttachment(base, String(req.params.id), index);
        res.type(file.contentType);
        if (file.disposition) res.setHeader('Content-Disposition', file.disposition);
        res.send(file.body);
      },
    },
  ];
}
