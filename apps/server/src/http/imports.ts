/**
 * POST /api/studies/:studyId/texts/import — a transcript file (txt, vtt, srt, docx) becomes a text.
 * Body: multipart/form-data with a `file` field (and optional `title`), or the raw bytes with
 * `?filename=` (and optional `&title=`). Owner and lead. The importer's failures are 422
 * `{error:{code, message, details:{format, line, column}}}`, the message naming the place in the file;
 * nothing is created then (the text, its document and the audit entry go in one transaction).
 * With `Accept: application/x-ndjson` the answer streams `{"progress":0.42}` lines and ends with
 * `{"text":{id,title,room,…}}` or, if the import fails after the stream began, `{"error":{…}}`.
 * POST …/import/preview takes the same body and answers what the import would make, committing nothing.
 */
import { ImportError, detectFormat } from '@gloss/interchange';
import type { Transcript } from '@gloss/model';
import type { Context } from 'hono';
import { Hono } from 'hono';
import { addTextFromTranscript } from '../admin/texts.js';
import { HttpError } from '../errors.js';
import { HeavyError } from '../heavy/errors.js';
import type { AppDeps, AppEnv } from './context.js';
import { errorBody } from './errors.js';
import { requireSession } from './middleware.js';
import { studyRole } from './study-access.js';
import { textSummary } from './texts.js';
import { logFor } from './log.js';
import { heavyOf, heavyRoute } from './heavy-route.js';

interface Upload {
  filename: string;
  bytes: Uint8Array;
  mediaType?: string;
  title?: string;
}

export function importRoutes(deps: AppDeps) {
  const app = new Hono<AppEnv>();
  app.use('*', requireSession(deps));

  // The same file read without committing: what the import would make (turns, speakers, times).
  // Files are read in a worker thread (heavy/jobs.ts): a large DOCX never stalls sync.
  const read = (upload: Upload, onProgress?: (f: number) => void) =>
    heavyOf(deps).run(
      'transcript',
      {
        upload: { filename: upload.filename, bytes: upload.bytes, ...(upload.mediaType ? { mediaType: upload.mediaType } : {}) },
        options: { maxBytes: deps.config.maxBodyBytes, ...(upload.title ? { title: upload.title } : {}) },
      },
      onProgress ? { onProgress } : {},
    );

  app.post('/preview', heavyRoute(deps), async (c) => {
    await studyRole(deps, c, 'text.import');
    const upload = await readUpload(c);
    try {
      const transcript = await read(upload);
      return c.json(previewOf(upload, transcript));
    } catch (err) {
      if (err instanceof ImportError) return c.json(importErrorBody(err), err.code === 'too_large' ? 413 : 422);
      throw err;
    }
  });

  app.post('/', heavyRoute(deps), async (c) => {
    const { studyId } = await studyRole(deps, c, 'text.import');
    const upload = await readUpload(c);
    const userId = c.get('session').user.id;
    const run = async (onProgress?: (f: number) => void) => {
      const transcript = await read(upload, onProgress);
      const title = (upload.title ?? transcript.title ?? upload.filename).trim().slice(0, 300) || upload.filename;
      const text = await addTextFromTranscript(deps.db, studyId, { title, transcript, sourceFormat: sourceFormat(upload), createdBy: userId });
      // open texts lists follow live; the text is stored whether or not the news goes out
      await deps.studyEvents?.publish({ action: 'texts-added', studyId, textIds: [text.id] }).catch((err: unknown) => deps.logger?.warn({ err, studyId }, 'study event not published'));
      return textSummary(text, text.room);
    };

    if (!/application\/x-ndjson/i.test(c.req.header('accept') ?? '')) {
      try {
        return c.json(await run(), 201);
      } catch (err) {
        if (err instanceof ImportError) return c.json(importErrorBody(err), err.code === 'too_large' ? 413 : 422);
        throw err;
      }
    }

    const encoder = new TextEncoder();
    const body = new ReadableStream<Uint8Array>({
      async start(controller) {
        const line = (obj: unknown) => controller.enqueue(encoder.encode(JSON.stringify(obj) + '\n'));
        let last = -1;
        try {
          const text = await run((f) => {
            // Two decimals are plenty for a progress bar; skip repeats.
            const rounded = Math.round(f * 100) / 100;
            if (rounded > last) line({ progress: (last = rounded) });
          });
          line({ text });
        } catch (err) {
          if (err instanceof ImportError) line(importErrorBody(err));
          else if (err instanceof HeavyError && err.code !== 'failed') line(errorBody(err.code, err.message));
          else {
            logFor(deps).error({ err }, 'text import failed');
            line(errorBody('internal', 'Something went wrong on the server; nothing was imported.'));
          }
        }
        controller.close();
      },
    });
    return new Response(body, { status: 200, headers: { 'content-type': 'application/x-ndjson; charset=utf-8', 'cache-control': 'no-store' } });
  });

  return app;
}

const PREVIEW_TURNS = 12;

/** What a preview shows: the format read, turn and word counts, each speaker's share, the time span, the first turns. */
export function previewOf(upload: Upload, transcript: Transcript) {
  const words = (t: string) => t.split(/\s+/).filter(Boolean).length;
  const speakers = new Map<string, { label: string; turns: number; words: number }>();
  let first: number | null = null;
  let last: number | null = null;
  for (const turn of transcript.turns) {
    const label = turn.speaker ?? '';
    const s = speakers.get(label) ?? { label, turns: 0, words: 0 };
    s.turns++;
    s.words += words(turn.text);
    speakers.set(label, s);
    if (turn.startMs !== null) first ??= turn.startMs;
    const end = turn.endMs ?? turn.startMs;
    if (end !== null) last = Math.max(last ?? 0, end);
  }
  return {
    filename: upload.filename,
    format: sourceFormat(upload),
    title: (upload.title ?? transcript.title ?? upload.filename).trim().slice(0, 300) || upload.filename,
    turnCount: transcript.turns.length,
    wordCount: [...speakers.values()].reduce((n, s) => n + s.words, 0),
    speakers: [...speakers.values()].filter((s) => s.label !== '').sort((a, b) => b.words - a.words || a.label.localeCompare(b.label)),
    unlabelledTurns: speakers.get('')?.turns ?? 0,
    timestamps: first === null ? null : { firstMs: first, lastMs: last ?? first },
    turns: transcript.turns.slice(0, PREVIEW_TURNS).map((t) => ({ speaker: t.speaker, startMs: t.startMs, endMs: t.endMs, text: t.text.slice(0, 400) })),
  };
}

function importErrorBody(err: ImportError) {
  return errorBody(err.code, err.message, { format: err.format, line: err.line, column: err.column ?? null });
}

const SHORT_NAME: Record<string, string> = { text: 'txt', webvtt: 'vtt', srt: 'srt', docx: 'docx' };

/** The short format name stored with the text (txt, vtt, srt, docx), as the importer chose it. */
function sourceFormat(upload: Upload): string {
  return SHORT_NAME[detectFormat(upload)] ?? 'txt';
}

async function readUpload(c: Context<AppEnv>): Promise<Upload> {
  const type = c.req.header('content-type') ?? '';
  const title = c.req.query('title') || undefined;
  if (/^multipart\/form-data/i.test(type)) {
    let form: Record<string, string | File | (string | File)[]>;
    try {
      form = await c.req.parseBody();
    } catch (err) {
      if (err instanceof HttpError) throw err;
      throw new HttpError(400, 'bad_request', 'The multipart body could not be read.');
    }
    const file = form.file;
    if (!(file instanceof File)) throw new HttpError(400, 'invalid_body', 'file: send the transcript as a form field named "file".');
    const formTitle = typeof form.title === 'string' && form.title.trim() ? form.title.trim() : undefined;
    return {
      filename: file.name || 'transcript',
      bytes: new Uint8Array(await file.arrayBuffer()),
      ...(file.type ? { mediaType: file.type } : {}),
      ...(formTitle ?? title ? { title: formTitle ?? title } : {}),
    };
  }
  const filename = c.req.query('filename');
  if (!filename) throw new HttpError(400, 'invalid_body', 'Send multipart/form-data with a "file" field, or the raw file with ?filename=<name>.');
  const bytes = new Uint8Array(await c.req.arrayBuffer());
  const mediaType = type && !/^application\/octet-stream/i.test(type) ? type : undefined;
  return { filename, bytes, ...(mediaType ? { mediaType } : {}), ...(title ? { title } : {}) };
}
