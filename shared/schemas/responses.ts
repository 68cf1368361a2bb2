import { z } from 'zod';
import { adminUserResponseSchema, backupResponseSchema, outboxListSchema, settingsResponseSchema, userListSchema } from './admin';
import {
  analysisCouponsResponseSchema,
  analysisFitResponseSchema,
  analysisSummaryResponseSchema,
  compareResultSchema,
  evidenceListSchema,
  evidenceResponseSchema,
  overviewSchema,
  runExpectedSchema,
  sampleSizeSchema,
} from './analysis';
import { acceptedResponseSchema, invitationPreviewSchema, userResponseSchema } from './auth';
import {
  batchResponseSchema,
  checkResponseSchema,
  correctedCheckResponseSchema,
  correctedWeighingResponseSchema,
  couponHistorySchema,
  couponListSchema,
  couponResponseSchema,
  couponRowListSchema,
  deletedMeasurementResponseSchema,
  weighingResponseSchema,
} from './coupons';
import {
  attachableViewListSchema,
  findingListSchema,
  findingResponseSchema,
  revisionListSchema,
  revisionResponseSchema,
  verificationResponseSchema,
} from './findings';
import {
  importDetailSchema,
  importListSchema,
  importPresetListSchema,
  importPresetResponseSchema,
  importProblemsSchema,
  importSampleResponseSchema,
  importUploadResponseSchema,
} from './imports';
import { resinListSchema, resinLotListSchema, resinLotResponseSchema, resinResponseSchema, speciesListSchema, speciesResponseSchema } from './reference';
import { optionsResponseSchema } from './options';
import { benchResponseSchema, photoResponseSchema, runChecksResponseSchema, runHistorySchema, runListSchema, runResponseSchema } from './runs';
import { createTrialCouponsResponseSchema, labelSheetSchema, trialListSchema, trialResponseSchema } from './trials';
import { wikiIndexSchema, wikiListSchema, wikiPageResponseSchema } from './wiki';

// The registry imports every feature's contracts: the server's test reads it; the client imports each
// contract from its feature's file, so a screen's bundle does not carry every other screen's schemas.

/** `GET /api/health`: 200 when the database takes a write; 503 with the same shape when it does not. */
/** `busy`: an import's commit holds the write lock for a few seconds; the server and its database are well. */
export const healthResponseSchema = z.object({ ok: z.boolean(), database: z.enum(['writable', 'busy', 'read-only', 'full', 'failing']) });

// ───────── the registry ─────────

/** What a route answers: a JSON body its schema parses, or (with the reason) something that is not JSON. */
export type ResponseContract = { json: z.ZodType } | { notJson: string };

const json = (schema: z.ZodType): ResponseContract => ({ json: schema });
const CSV = { notJson: 'a CSV file to download (text/csv)' } as const;

/**
 * Every mounted route, `METHOD /api/path` exactly as declared, with the contract of its successful answer.
 * `server/http/responses.test.ts` calls the GET routes (and the main writes) on a seeded app and parses each
 * answer through its schema; it fails when a mounted route is missing here or an entry names no route.
 * Errors answer the envelope of `common.ts` on every route and are not repeated.
 */
export const RESPONSE_CONTRACTS: Record<string, ResponseContract> = {
  'GET /api/health': json(healthResponseSchema),

  'POST /api/auth/login': json(userResponseSchema),
  'POST /api/auth/logout': { notJson: '204 No Content: the session cookie is cleared' },
  'GET /api/auth/me': json(userResponseSchema),
  'PATCH /api/auth/me': json(userResponseSchema),
  'POST /api/auth/password-reset': json(acceptedResponseSchema),
  'POST /api/auth/password-reset/confirm': json(acceptedResponseSchema),
  'GET /api/auth/invitations/:token': json(invitationPreviewSchema),
  'POST /api/auth/invitations/accept': json(userResponseSchema),
  'GET /api/users': json(userListSchema),
  'POST /api/users/invitations': json(adminUserResponseSchema),
  'PATCH /api/users/:id': json(adminUserResponseSchema),

  'GET /api/admin/outbox': json(outboxListSchema),
  'POST /api/admin/backup': json(backupResponseSchema),
  'GET /api/settings': json(settingsResponseSchema),
  'PATCH /api/settings': json(settingsResponseSchema),

  'GET /api/runs': json(runListSchema),
  'GET /api/runs/export.csv': CSV,
  'GET /api/runs/options': json(optionsResponseSchema),
  'POST /api/runs': json(runResponseSchema),
  'GET /api/runs/:id': json(runResponseSchema),
  'PATCH /api/runs/:id': json(runResponseSchema),
  'POST /api/runs/:id/stages': json(runResponseSchema),
  'POST /api/runs/:id/stages/:stage/corrections': json(runResponseSchema),
  'GET /api/runs/:id/history': json(runHistorySchema),
  'GET /api/runs/:id/checks': json(runChecksResponseSchema),
  'GET /api/bench': json(benchResponseSchema),

  'GET /api/coupons': json(couponRowListSchema),
  'GET /api/coupons/full': json(couponListSchema),
  'GET /api/coupons/export.csv': CSV,
  'POST /api/coupons': json(couponResponseSchema),
  'POST /api/coupons/measurements': json(batchResponseSchema),
  'GET /api/coupons/:id': json(couponResponseSchema),
  'PATCH /api/coupons/:id': json(couponResponseSchema),
  'POST /api/coupons/:id/weighings': json(weighingResponseSchema),
  'POST /api/coupons/:id/checks': json(checkResponseSchema),
  'GET /api/coupons/:id/history': json(couponHistorySchema),
  'PATCH /api/weighings/:id': json(correctedWeighingResponseSchema),
  'DELETE /api/weighings/:id': json(deletedMeasurementResponseSchema),
  'PATCH /api/checks/:id': json(correctedCheckResponseSchema),
  'DELETE /api/checks/:id': json(deletedMeasurementResponseSchema),
  'POST /api/coupons/:id/photos': json(photoResponseSchema),
  'POST /api/runs/:id/photos': json(photoResponseSchema),
  'GET /api/photos/:id': { notJson: 'the photo file itself (image/jpeg, image/png or image/webp)' },

  'GET /api/species': json(speciesListSchema),
  'GET /api/species/options': json(optionsResponseSchema),
  'GET /api/species/:id': json(speciesResponseSchema),
  'POST /api/species': json(speciesResponseSchema),
  'PATCH /api/species/:id': json(speciesResponseSchema),
  'GET /api/resins': json(resinListSchema),
  'GET /api/resins/options': json(optionsResponseSchema),
  'GET /api/resins/:id': json(resinResponseSchema),
  'POST /api/resins': json(resinResponseSchema),
  'PATCH /api/resins/:id': json(resinResponseSchema),
  'GET /api/resin-lots': json(resinLotListSchema),
  'GET /api/resin-lots/options': json(optionsResponseSchema),
  'GET /api/resin-lots/:id': json(resinLotResponseSchema),
  'POST /api/resin-lots': json(resinLotResponseSchema),
  'PATCH /api/resin-lots/:id': json(resinLotResponseSchema),

  'GET /api/trials': json(trialListSchema),
  'GET /api/trials/export.csv': CSV,
  'GET /api/trials/options': json(optionsResponseSchema),
  'POST /api/trials': json(trialResponseSchema),
  'GET /api/trials/:id': json(trialResponseSchema),
  'PATCH /api/trials/:id': json(trialResponseSchema),
  'POST /api/trials/:id/coupons': json(createTrialCouponsResponseSchema),
  'GET /api/trials/:id/labels': json(labelSheetSchema),

  'GET /api/findings': json(findingListSchema),
  'POST /api/findings': json(findingResponseSchema),
  'GET /api/findings/attachable-views': json(attachableViewListSchema),
  'GET /api/findings/:id': json(findingResponseSchema),
  'PATCH /api/findings/:id': json(findingResponseSchema),
  'GET /api/findings/:id/revisions': json(revisionListSchema),
  'GET /api/findings/:id/revisions/:revision': json(revisionResponseSchema),
  'POST /api/findings/:id/evidence': json(findingResponseSchema),
  'DELETE /api/findings/:id/evidence/:evidenceId': json(findingResponseSchema),
  'POST /api/findings/:id/submit': json(findingResponseSchema),
  'POST /api/findings/:id/comments': json(findingResponseSchema),
  'POST /api/findings/:id/return': json(findingResponseSchema),
  'POST /api/findings/:id/reopen': json(findingResponseSchema),
  'POST /api/findings/:id/withdraw': json(findingResponseSchema),
  'POST /api/findings/:id/revise': json(findingResponseSchema),
  'POST /api/findings/:id/approve': json(findingResponseSchema),
  'GET /api/findings/:id/verify': json(verificationResponseSchema),

  'GET /api/wiki': json(wikiListSchema),
  'GET /api/wiki/index': json(wikiIndexSchema),
  'GET /api/wiki/:slug': json(wikiPageResponseSchema),
  'GET /api/wiki/:slug/export': { notJson: 'a .tar.gz archive of the page and its frozen plots (application/gzip)' },

  'GET /api/analysis/overview': json(overviewSchema),
  'GET /api/analysis/summary': json(analysisSummaryResponseSchema),
  'GET /api/analysis/fit': json(analysisFitResponseSchema),
  'GET /api/analysis/coupons': json(analysisCouponsResponseSchema),
  'POST /api/analysis/compare': json(compareResultSchema),
  'GET /api/analysis/runs/:id/expected': json(runExpectedSchema),
  'GET /api/analysis/sample-size': json(sampleSizeSchema),
  'GET /api/evidence': json(evidenceListSchema),
  'POST /api/evidence': json(evidenceResponseSchema),
  'GET /api/evidence/:id': json(evidenceResponseSchema),

  'GET /api/imports': json(importListSchema),
  'POST /api/imports': json(importUploadResponseSchema),
  'GET /api/imports/template.csv': CSV,
  'GET /api/imports/presets': json(importPresetListSchema),
  'POST /api/imports/presets': json(importPresetResponseSchema),
  'GET /api/imports/:id': json(importDetailSchema),
  'GET /api/imports/:id/problems': json(importProblemsSchema),
  'GET /api/imports/:id/problems.csv': CSV,
  'POST /api/imports/:id/sample': json(importSampleResponseSchema),
  'POST /api/imports/:id/preview': json(importDetailSchema),
  'POST /api/imports/:id/commit': json(importDetailSchema),
  'POST /api/imports/:id/undo': json(importDetailSchema),
};
