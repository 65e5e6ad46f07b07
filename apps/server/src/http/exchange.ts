/**
 * Exports and REFI-QDA imports over HTTP (owner and lead: the `export` permission; imports also need
 * `codebook.write` and `text.import`):
 *   GET  /api/studies/:studyId/export?format=csv|codebook-md|codebook-csv|memos-md|qdc|qdpx — streamed
 *        as an attachment; audited before the first byte.
 *   POST /api/studies/:studyId/import?format=qdc|qdpx[&end=auto|exclusive|inclusive] — the file as the
 *        raw body (or multipart field "file"); adds to the study.
 *   POST /api/studies/import?format=qdc|qdpx[&title=…] — a new study owned by the caller.
 *   GET  /api/exchange/losses — what the standard cannot carry, to show before each import and export.
 * A refused file is 422 `{error:{code, message}}` (code from ExchangeError: unsafe_path, bad_xml, …)
 * and nothing is written.
 */
import { memoReaderView } from '../access/memo-view.js';
import { ExchangeError, exportLosses, importLosses } from '@gloss/interchange';
import type { Context } from 'hono';
import { Hono } from 'hono';
import { can } from '../access/policy.js';
import { HttpError, forbidden } from '../errors.js';
import type { ImportReport, ImportTarget } from '../exchange/apply-import.js';
import { readableLayers } from '../analysis/facts.js';
import { EXPORT_FORMATS, isExportFormat, runExport } from '../exchange/run-export.js';
import { IMPORT_FORMATS, runImport, type ImportFormat } from '../exchange/run-import.js';
import type { AppDeps, AppEnv } from './context.js';
import { errorBody } from './errors.js';
import { requireSession } from './middleware.js';
import { requireStore } from './segments.js';
import { studyRole } from './study-access.js';
import { logFor } from './log.js';
import { heavyOf, heavyRoute } from './heavy-route.js';

export function exchangeBody(err: ExchangeError) {
  return errorBody(err.code, err.message);
}

async function readFileBody(c: Context<AppEnv>): Promise<Uint8Array> {
  const type = c.req.header('content-type') ?? '';
  if (/^multipart\/form-data/i.test(type)) {
    const form = await c.req.parseBody().catch(() => {
      throw new HttpError(400, 'bad_request', 'The multipart body could not be read.');
    });
    const file = form.file;
    if (!(file instanceof File)) throw new HttpError(400, 'invalid_body', 'file: send the file as a form field named "file".');
    return new Uint8Array(await file.arrayBuffer());
  }
  const bytes = new Uint8Array(await c.req.arrayBuffer());
  if (bytes.byteLength === 0) throw new HttpError(400, 'invalid_body', 'Send the .qdc or .qdpx file as the request body.');
  return bytes;
}

function importFormat(c: Context): ImportFormat {
  const f = c.req.query('format');
  if (!(IMPORT_FORMATS as readonly string[]).includes(f ?? '')) throw new HttpError(400, 'bad_request', `format must be one of ${IMPORT_FORMATS.join(', ')}.`);
  return f as ImportFormat;
}

function endParam(c: Context): 'auto' | 'exclusive' | 'inclusive' {
  const e = c.req.query('end') ?? 'auto';
  if (e !== 'auto' && e !== 'exclusive' && e !== 'inclusive') throw new HttpError(400, 'bad_request', 'end must be auto, exclusive or inclusive.');
  return e;
}

export function exchangeRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  app.get('/:studyId/export', heavyRoute(deps), async (c) => {
    const { studyId, role } = await studyRole(deps, c, 'export');
    const format = c.req.query('format');
    if (!isExportFormat(format)) throw new HttpError(400, 'bad_request', `format must be one of ${EXPORT_FORMATS.join(', ')}.`);
    const layers = c.req.query('layers') ?? 'coders';
    if (layers !== 'coders' && layers !== 'consensus') throw new HttpError(400, 'bad_request', 'layers must be coders or consensus.');
    const me = c.get('session').user.id;
    // A lead coding a round independently exports no one else's layer of the round's texts.
    const readable = new Set((await readableLayers(deps.db, studyId, role, me)).map((l) => l.id));
    // and of the memos only the entries they receive (a participant: no one else's jottings on round segments)
    const memoView = await memoReaderView(deps.db, studyId, me, role);
    const result = await runExport(deps.db, requireStore(deps), studyId, format, { actorId: me, via: 'http', layers, canReadLayer: (id) => readable.has(id), memoView, heavy: heavyOf(deps) });
    const iterator = result.body[Symbol.asyncIterator]();
    const stream = new ReadableStream<Uint8Array>({
      async pull(controller) {
        try {
          const next = await iterator.next();
          if (next.done) controller.close();
          else controller.enqueue(next.value);
        } catch (err) {
          logFor(deps).error({ err }, 'export stream failed');
          controller.error(err);
        }
      },
      async cancel() {
        await iterator.return?.();
      },
    });
    return new Response(stream, {
      status: 200,
      headers: {
        'content-type': result.contentType,
        'content-disposition': `attachment; filename="${result.filename}"`,
        'cache-control': 'no-store',
        'x-content-type-options': 'nosniff',
      },
    });
  });

  const importInto = async (c: Context<AppEnv>, target: ImportTarget) => {
    const format = importFormat(c);
    const bytes = await readFileBody(c);
    let report: ImportReport;
    try {
      report = await runImport(deps.db, requireStore(deps), target, format, bytes, c.get('session').user.id, { endPosition: endParam(c), maxBytes: deps.config.maxBodyBytes, heavy: heavyOf(deps) });
    } catch (err) {
      if (err instanceof ExchangeError) return c.json(exchangeBody(err), err.code === 'too_large' ? 413 : 422);
      throw err;
    }
    await publishImport(deps, report);
    const { documentIds: _ids, textIds: _texts, appended: _appended, ...out } = report;
    return c.json(out, 201);
  };

  app.post('/import', heavyRoute(deps), async (c) => {
    const title = (c.req.query('title') ?? '').trim().slice(0, 300);
    return importInto(c, { newStudy: { title } });
  });

  app.post('/:studyId/import', heavyRoute(deps), async (c) => {
    const { studyId, role } = await studyRole(deps, c);
    if (!can(role, 'codebook.write') || !can(role, 'text.import')) throw forbidden('Only owners and leads may import into a study.');
    return importInto(c, { studyId });
  });

  return app;
}

/**
 * Makes an import seen live by open screens: its codebook and memos additions go to the open rooms (on
 * every node), its documents are projected now (so analysis counts them when told), then open texts
 * lists and analysis screens are told. The import is stored by now: a failure here is logged, not answered.
 */
async function publishImport(deps: AppDeps, report: ImportReport): Promise<void> {
  const warn = (err: unknown) => deps.logger?.warn({ err, studyId: report.studyId }, 'an import could not be announced live; screens see it when they reload');
  if (!report.created) for (const a of report.appended) await deps.docs?.announce(a.docId, a.seq, a.update).catch(warn);
  if (deps.projector?.settle) await deps.projector.settle(report.documentIds).catch(warn);
  else for (const id of report.documentIds) deps.projector?.notify(id);
  if (!report.created) await deps.studyEvents?.publish({ action: 'imported', studyId: report.studyId, textIds: report.textIds }).catch(warn);
}

export function lossesRoutes() {
  const app = new Hono<AppEnv>();
  app.get('/losses', (c) =>
    c.json({
      export: { qdc: exportLosses('qdc'), qdpx: exportLosses('qdpx') },
      import: { qdc: importLosses('qdc'), qdpx: importLosses('qdpx') },
    }),
  );
  return app;
}
