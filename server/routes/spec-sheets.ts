import path from 'node:path';
import { fileURLToPath } from 'node:url';
import type { Knex } from 'knex';
import { BENCH } from '../../shared/roles';
import { serialParamSchema } from '../../shared/schemas/spec-sheets';
import { verifyLimiters } from '../auth/limits';
import type { Config } from '../config';
import { pathId, pathSerial } from '../http/params';
import { currentUser, type RouteDef } from '../http/route-table';
import { jobArchive, latestBatchJob, requestBatchSheets, sheetJob } from '../services/spec-sheets/batch-jobs';
import { orderSheets, regenerateSheet, unitSheetPdf } from '../services/spec-sheets/sheets';
import { shopName, verifyUnit } from '../services/spec-sheets/verify';
import { tooManyChecksPage, unknownSerialPage, verifiedPage } from '../services/spec-sheets/verify-page';

/** Who makes sheets for others: the owner, the planner (batches) and the tester (units). */
const SHEET_MAKERS = BENCH;

// The verification page's two font weights, shipped in the source-sans package (nothing fetched from elsewhere).
const root = path.resolve(path.dirname(fileURLToPath(import.meta.url)), '..', '..');
const VERIFY_FONTS: Record<string, string> = {
  regular: path.join(root, 'node_modules/source-sans/WOFF2/TTF/SourceSans3-Regular.ttf.woff2'),
  semibold: path.join(root, 'node_modules/source-sans/WOFF2/TTF/SourceSans3-Semibold.ttf.woff2'),
};

export function specSheetRoutes(knex: Knex, config: Config): RouteDef[] {
  // The public page is rate-limited per address (all checks a minute, misses a day), counted in PostgreSQL.
  const limits = verifyLimiters(knex, config, async (_req, res) => { res.status(429).type('html').send(tooManyChecksPage(await shopName(knex))); });
  return [
    {
      // Staff, or the customer whose order the unit is on (anyone else's unit is "not found"): checked in the service.
      method: 'get', path: '/api/units/:serial/spec-sheet.pdf', allow: 'signed-in',
      handler: async (req, res) => {
        const sheet = await unitSheetPdf(knex, currentUser(req), pathSerial(req), config.publicUrl);
        res.type('application/pdf').set('Content-Disposition', `inline; filename="${sheet.filename}"`).set('Cache-Control', 'private, no-store').send(sheet.pdf);
      },
    },
    {
      method: 'post', path: '/api/units/:serial/spec-sheet/regenerate', allow: SHEET_MAKERS,
      handler: async (req, res) => res.json(await regenerateSheet(knex, currentUser(req), pathSerial(req), config.publicUrl)),
    },
    {
      // The customer's own order (anyone else's is "not found"), or any order for staff: checked in the service.
      method: 'get', path: '/api/orders/:id/spec-sheets', allow: 'signed-in',
      handler: async (req, res) => res.json({ units: await orderSheets(knex, currentUser(req), pathId(req, 'id', 'order')) }),
    },
    {
      method: 'post', path: '/api/batches/:id/spec-sheets', allow: SHEET_MAKERS,
      handler: async (req, res) => {
        const { job } = await requestBatchSheets(knex, currentUser(req), pathId(req, 'id', 'batch'));
        res.status(202).json({ job });
      },
    },
    {
      method: 'get', path: '/api/batches/:id/spec-sheets/latest', allow: SHEET_MAKERS,
      handler: async (req, res) => res.json({ job: await latestBatchJob(knex, pathId(req, 'id', 'batch')) }),
    },
    { method: 'get', path: '/api/spec-sheet-jobs/:id', allow: SHEET_MAKERS, handler: async (req, res) => res.json({ job: await sheetJob(knex, pathId(req, 'id', 'sheet job')) }) },
    {
      method: 'get', path: '/api/spec-sheet-jobs/:id/archive.zip', allow: SHEET_MAKERS,
      handler: async (req, res) => {
        const archive = await jobArchive(knex, pathId(req, 'id', 'sheet job'));
        res.type('application/zip').set('Content-Disposition', `attachment; filename="${archive.filename}"`).send(archive.data);
      },
    },
    {
      method: 'get', path: '/verify-fonts/:weight', allow: 'public',
      handler: (req, res) => {
        // An own-property lookup: `constructor` or `__proto__` is not a font.
        const weight = String(req.params.weight).replace(/\.woff2$/, '');
        const file = Object.hasOwn(VERIFY_FONTS, weight) ? VERIFY_FONTS[weight] : undefined;
        if (!file) return res.status(404).type('text').send('No such font');
        return res.type('font/woff2').set('Cache-Control', 'public, max-age=86400').sendFile(file);
      },
    },
    {
      // ?c= is the unit's code from its spec sheet's link (required for units that have one).
      method: 'get', path: '/verify/:serial', allow: 'public', before: limits,
      handler: async (req, res) => {
        const shop = await shopName(knex);
        const raw = String(req.params.serial);
        const code = typeof req.query.c === 'string' ? req.query.c.slice(0, 100) : '';
        const unit = serialParamSchema.safeParse(raw).success ? await verifyUnit(knex, raw.trim(), code) : null;
        res.set('Cache-Control', 'no-store');
        if (!unit) return res.status(404).type('html').send(unknownSerialPage(shop, raw));
        return res.type('html').send(verifiedPage(shop, unit));
      },
    },
  ];
}
