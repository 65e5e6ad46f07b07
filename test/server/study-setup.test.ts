/**
 * First run, invitations, password resets and password changes against a real server (in this
 * process, so the test can move a link's expiry in the database), once per database kind (PGlite;
 * PostgreSQL when DATABASE_URL is set). Expected behaviour from the project brief (issue 12: a
 * one-time set-up code, single-use expiring links, a password change ends the other sessions) and,
 * for the status codes, RFC 9110 (403, 404, 409, 410 Gone for a link that no longer works).
 */
import { spawn } from 'node:child_process';
import { readFileSync } from 'node:fs';
import { createInterface } from 'node:readline';
import { accountLinks, auditLog, eq, sessions } from '@gloss/db';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { loadConfig, printSetupCode, startServer, type RunningServer } from '../../apps/server/src/index.js';
import { createUser } from '../../apps/server/src/admin/index.js';
import { freshPgliteDir, freshPostgresDatabase } from '../support/database.js';
import { apiClient, sessionCookieFrom, signIn, type ApiClient } from '../support/http.js';
import { dbKinds } from '../support/server.js';

type Err = { error: { code: string; message: string } };

async function startFresh(kind: 'pglite' | 'postgres') {
  if (kind === 'pglite') {
    const folder = await freshPgliteDir();
    const server = await startServer(loadConfig({ PORT: '0', DATA_DIR: folder.dir, LOG_LEVEL: 'silent' }));
    return { server, drop: async () => folder.remove() };
  }
  const fresh = await freshPostgresDatabase();
  const server = await startServer(loadConfig({ PORT: '0', DATABASE_URL: fresh.url, LOG_LEVEL: 'silent' }));
  return { server, drop: () => fresh.drop() };
}

/** POST as a browser of the server's own origin; returns status, body and the session cookie set, if any. */
async function post(url: string, path: string, body: unknown, cookie?: string) {
  const res = await fetch(url + path, {
    method: 'POST',
    headers: { 'content-type': 'application/json', origin: url, ...(cookie ? { cookie } : {}) },
    body: JSON.stringify(body),
  });
  const text = await res.text();
  return { status: res.status, body: (text ? JSON.parse(text) : null) as Record<string, unknown> & Err, cookie: sessionCookieFrom(res.headers) };
}

describe.each(dbKinds())('study set-up on %s', (kind) => {
  let server: RunningServer;
  let drop: () => Promise<void>;
  let ownerCookie: string;
  let owner: ApiClient;
  let studyId: string;

  beforeAll(async () => {
    ({ server, drop } = await startFresh(kind));
  }, 240_000); // a PGlite start took over two minutes on the loaded 2-core machine
  afterAll(async () => {
    await server?.close();
    await drop?.();
  });

  it('an empty database prints a set-up code; a wrong code is refused; the right one creates the owner once', async () => {
    const out: string[] = [];
    const printed = await printSetupCode(server, { write: (s: string) => out.push(s) } as unknown as NodeJS.WritableStream);
    expect(printed).toBe(true);
    const event = JSON.parse(out[0]!) as { event: string; code: string };
    expect(event).toEqual({ event: 'setup', code: server.firstRun.code });
    expect(event.code).toMatch(/^[A-Z2-9]{4}-[A-Z2-9]{4}-[A-Z2-9]{4}$/);

    expect((await apiClient(server.url).call('GET', '/api/setup')).body).toEqual({ needed: true });
    const owner1 = { email: 'wren.owner@example.test', name: 'Wren Okafor', password: 'first-owner-pw' };
    const wrong = await post(server.url, '/api/setup', { ...owner1, code: 'AAAA-AAAA-AAAA' });
    expect(wrong.status).toBe(403);
    expect(wrong.body.error.code).toBe('bad_setup_code');

    // case and dashes do not matter to a person reading the code off a terminal
    const ok = await post(server.url, '/api/setup', { ...owner1, code: event.code.toLowerCase().replace(/-/g, ' ') });
    expect(ok.status).toBe(201);
    expect(ok.body).toMatchObject({ email: owner1.email, name: owner1.name });
    expect(ok.cookie).toBeTruthy();
    ownerCookie = ok.cookie!;
    owner = apiClient(server.url, ownerCookie);
    expect((await owner.call('GET', '/api/me')).status).toBe(200);

    // only once: the same code again, and any code, now meet an account
    const again = await post(server.url, '/api/setup', { email: 'mallory@example.test', name: 'M', password: 'another-pw-1', code: event.code });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('already_set_up');
    expect((await apiClient(server.url).call('GET', '/api/setup')).body).toEqual({ needed: false });
    const out2: string[] = [];
    expect(await printSetupCode(server, { write: (s: string) => out2.push(s) } as unknown as NodeJS.WritableStream)).toBe(false);
    expect(out2).toEqual([]);
    const log = await server.db.select().from(auditLog).where(eq(auditLog.action, 'server.setup'));
    expect(log).toHaveLength(1);
  });

  it('the owner creates, edits and archives a study with mode, retention date and ethics note', async () => {
    const created = await owner.call<Record<string, unknown>>('POST', '/api/studies', {
      title: 'Lighthouse keepers',
      description: 'Interviews with retired keepers of the Skerrow light.',
      mode: 'reflexive',
      retentionUntil: '2031-06-30T00:00:00.000Z',
      ethicsNote: 'Approved by the (invented) Skerrow College board, ref. SC-21-04; consent covers audio and transcripts.',
    });
    expect(created.status).toBe(201);
    expect(created.body).toMatchObject({ mode: 'reflexive', retentionUntil: '2031-06-30T00:00:00.000Z', archivedAt: null, ethicsNote: expect.stringContaining('SC-21-04') });
    studyId = created.body.id as string;
    const patched = await owner.call<Record<string, unknown>>('PATCH', `/api/studies/${studyId}`, { mode: 'standard', ethicsNote: 'Amended consent, v2.' });
    expect(patched.body).toMatchObject({ mode: 'standard', ethicsNote: 'Amended consent, v2.' });
    const archived = await owner.call<Record<string, unknown>>('PATCH', `/api/studies/${studyId}`, { archived: true });
    expect(archived.body.archivedAt).toEqual(expect.any(String));
    const list = await owner.call<Array<Record<string, unknown>>>('GET', '/api/studies');
    expect(list.body.find((s) => s.id === studyId)?.archivedAt).toEqual(expect.any(String));
    const back = await owner.call<Record<string, unknown>>('PATCH', `/api/studies/${studyId}`, { archived: false });
    expect(back.body.archivedAt).toBeNull();
    const actions = (await server.db.select().from(auditLog).where(eq(auditLog.studyId, studyId))).map((a) => a.action);
    expect(actions).toEqual(['study.create', 'study.update', 'study.archive', 'study.unarchive']);
  });

  it('an invitation link is single-use, expires, and carries only a role the inviter may give', async () => {
    const inv = await owner.call<{ token: string; path: string; role: string; expiresAt: string }>('POST', `/api/studies/${studyId}/invitations`, { email: 'Juno.Coder@Example.test', role: 'coder' });
    expect(inv.status).toBe(201);
    expect(inv.body.path).toBe(`/#/invite/${inv.body.token}`);
    // the link itself is never stored: only its SHA-256
    const stored = await server.db.select().from(accountLinks).where(eq(accountLinks.studyId, studyId));
    expect(stored.map((r) => r.tokenHash)).not.toContain(inv.body.token);

    const anon = apiClient(server.url);
    const info = await anon.call<Record<string, unknown>>('GET', `/api/invitations/${inv.body.token}`);
    expect(info.body).toMatchObject({ email: 'juno.coder@example.test', role: 'coder', studyTitle: 'Lighthouse keepers', accountExists: false });

    const accepted = await post(server.url, `/api/invitations/${inv.body.token}/accept`, { name: 'Juno Varga', password: 'juno-password-1' });
    expect(accepted.status).toBe(200);
    expect(accepted.body).toMatchObject({ studyId, role: 'coder', email: 'juno.coder@example.test' });
    const juno = apiClient(server.url, accepted.cookie!);
    expect((await juno.call<Record<string, unknown>>('GET', `/api/studies/${studyId}`)).body.role).toBe('coder');

    // single use: a second accept, even with other details, is 410
    const twice = await post(server.url, `/api/invitations/${inv.body.token}/accept`, { name: 'Someone Else', password: 'other-password-1' });
    expect(twice.status).toBe(410);
    expect(twice.body.error.code).toBe('link_used');
    expect((await anon.call<Err>('GET', `/api/invitations/${inv.body.token}`)).status).toBe(410);

    // expiry: a link past its time is 410 link_expired and creates nothing
    const late = await owner.call<{ token: string; id: string }>('POST', `/api/studies/${studyId}/invitations`, { email: 'late@example.test', role: 'observer' });
    await server.db.update(accountLinks).set({ expiresAt: new Date(Date.now() - 1000) }).where(eq(accountLinks.id, late.body.id));
    const expired = await post(server.url, `/api/invitations/${late.body.token}/accept`, { name: 'Late Comer', password: 'late-password-1' });
    expect(expired.status).toBe(410);
    expect(expired.body.error.code).toBe('link_expired');
    expect((await apiClient(server.url).call('POST', '/api/session', { email: 'late@example.test', password: 'late-password-1' })).status).toBe(401);

    // unknown tokens are 404
    expect((await anon.call('GET', '/api/invitations/aaaaaaaaaaaaaaaaaaaaaaaaaaaaaaaa')).status).toBe(404);

    // wrong role: a coder may not invite at all; a lead may not invite an owner; a made-up role is a bad body
    expect((await juno.call<Err>('POST', `/api/studies/${studyId}/invitations`, { email: 'x@example.test', role: 'coder' })).status).toBe(403);
    const lead = await owner.call<{ token: string }>('POST', `/api/studies/${studyId}/invitations`, { email: 'lark.lead@example.test', role: 'lead' });
    const leadIn = await post(server.url, `/api/invitations/${lead.body.token}/accept`, { name: 'Lark Ibsen', password: 'lark-password-1' });
    const leadClient = apiClient(server.url, leadIn.cookie!);
    const asOwner = await leadClient.call<Err>('POST', `/api/studies/${studyId}/invitations`, { email: 'y@example.test', role: 'owner' });
    expect(asOwner.status).toBe(403);
    expect(asOwner.body.error.message).toMatch(/owner/);
    expect((await leadClient.call('POST', `/api/studies/${studyId}/invitations`, { email: 'z@example.test', role: 'boss' })).status).toBe(400);
    expect((await leadClient.call('POST', `/api/studies/${studyId}/invitations`, { email: 'z@example.test', role: 'observer' })).status).toBe(201);

    // an existing account joins with its own password, not a new one
    await createUser(server.db, { email: 'kit.existing@example.test', name: 'Kit Existing', password: 'kit-password-1' });
    const kitInv = await owner.call<{ token: string }>('POST', `/api/studies/${studyId}/invitations`, { email: 'kit.existing@example.test', role: 'trainee' });
    const kitWrong = await post(server.url, `/api/invitations/${kitInv.body.token}/accept`, { password: 'not-kits-password' });
    expect(kitWrong.status).toBe(401);
    const kitOk = await post(server.url, `/api/invitations/${kitInv.body.token}/accept`, { password: 'kit-password-1' });
    expect(kitOk.status).toBe(200);
    expect(kitOk.body.role).toBe('trainee');

    const actions = (await server.db.select().from(auditLog).where(eq(auditLog.studyId, studyId))).map((a) => a.action);
    expect(actions.filter((a) => a === 'member.invite')).toHaveLength(5);
    expect(actions.filter((a) => a === 'member.join')).toHaveLength(3);
  });

  it('changing one’s password ends the other sessions; an owner’s reset link works once and ends them all', async () => {
    await createUser(server.db, { email: 'ash.two@example.test', name: 'Ash Two', password: 'ash-password-1' });
    const a = await signIn(server.url, 'ash.two@example.test', 'ash-password-1');
    const b = await signIn(server.url, 'ash.two@example.test', 'ash-password-1');
    const wrong = await apiClient(server.url, a).call<Err>('PUT', '/api/me/password', { currentPassword: 'nope-nope', newPassword: 'ash-password-2' });
    expect(wrong.status).toBe(403);
    expect((await apiClient(server.url, b).call('GET', '/api/me')).status).toBe(200);
    const changed = await apiClient(server.url, a).call('PUT', '/api/me/password', { currentPassword: 'ash-password-1', newPassword: 'ash-password-2' });
    expect(changed.status).toBe(204);
    expect((await apiClient(server.url, a).call('GET', '/api/me')).status).toBe(200);
    expect((await apiClient(server.url, b).call('GET', '/api/me')).status).toBe(401);
    expect((await apiClient(server.url).call('POST', '/api/session', { email: 'ash.two@example.test', password: 'ash-password-1' })).status).toBe(401);
    await signIn(server.url, 'ash.two@example.test', 'ash-password-2');

    // reset: only an owner of a study the person belongs to may make the link
    const juno = (await server.db.select().from(auditLog).where(eq(auditLog.action, 'member.join')))[0]!.userId!;
    const junoCookie = await signIn(server.url, 'juno.coder@example.test', 'juno-password-1');
    const lead = await signIn(server.url, 'lark.lead@example.test', 'lark-password-1');
    expect((await apiClient(server.url, lead).call('POST', `/api/studies/${studyId}/members/${juno}/reset-link`)).status).toBe(403);
    const reset = await owner.call<{ token: string; path: string }>('POST', `/api/studies/${studyId}/members/${juno}/reset-link`);
    expect(reset.status).toBe(201);
    expect(reset.body.path).toBe(`/#/reset/${reset.body.token}`);
    expect((await apiClient(server.url).call('GET', `/api/password-resets/${reset.body.token}`)).body).toMatchObject({ email: 'juno.coder@example.test' });
    expect((await post(server.url, `/api/password-resets/${reset.body.token}`, { password: 'short' })).status).toBe(400);
    expect((await post(server.url, `/api/password-resets/${reset.body.token}`, { password: 'juno-password-2' })).status).toBe(204);
    expect((await apiClient(server.url, junoCookie).call('GET', '/api/me')).status).toBe(401);
    expect(await server.db.select().from(sessions).where(eq(sessions.userId, juno))).toEqual([]);
    expect((await post(server.url, `/api/password-resets/${reset.body.token}`, { password: 'juno-password-3' })).body.error.code).toBe('link_used');
    await signIn(server.url, 'juno.coder@example.test', 'juno-password-2');
  });

  it('previews an import without committing it, and refuses a broken file with its place and nothing left behind', async () => {
    const vtt = readFileSync(new URL('../../packages/interchange/src/fixtures/harbour-interview.vtt', import.meta.url));
    const form = new FormData();
    form.append('file', new Blob([vtt]), 'harbour-interview.vtt');
    const res = await fetch(`${server.url}/api/studies/${studyId}/texts/import/preview`, { method: 'POST', headers: { origin: server.url, cookie: ownerCookie }, body: form });
    expect(res.status).toBe(200);
    const preview = (await res.json()) as { format: string; speakers: Array<{ label: string }>; timestamps: { firstMs: number } | null; turns: Array<{ speaker: string }> };
    expect(preview.format).toBe('vtt');
    // the fixture's voices (WebVTT <v> spans): the interviewer and the invented dock worker
    expect(preview.speakers.map((s) => s.label).sort()).toEqual(['Interviewer', 'Tobias Lund']);
    expect(preview.timestamps?.firstMs).toBe(2000);
    expect(preview.turns[0]!.speaker).toBe('Interviewer');
    expect((await owner.call<unknown[]>('GET', `/api/studies/${studyId}/texts`)).body).toEqual([]);

    // an SRT cue whose timing line cannot be read: 422 naming the line; no text, document or log row
    const bad = '1\n00:00:01,000 --> 00:00:03,000\nKAI: The ferry left at six.\n\n2\n00:00:0x,000 --> 00:00:05,000\nINTERVIEWER: Every day?\n';
    const refused = await fetch(`${server.url}/api/studies/${studyId}/texts/import?filename=ferry.srt`, { method: 'POST', headers: { origin: server.url, cookie: ownerCookie, 'content-type': 'application/octet-stream' }, body: bad });
    expect(refused.status).toBe(422);
    const body = (await refused.json()) as { error: { code: string; message: string; details: { format: string; line: number } } };
    expect(body.error.details).toMatchObject({ format: 'srt', line: 6 });
    expect(body.error.message).toMatch(/line 6/);
    expect((await owner.call<unknown[]>('GET', `/api/studies/${studyId}/texts`)).body).toEqual([]);
    expect((await server.db.select().from(auditLog).where(eq(auditLog.studyId, studyId))).map((a) => a.action)).not.toContain('text.import');
  });

  it('filters the audit log by action family, person and time', async () => {
    const all = (await owner.call<Array<{ action: string; userId: string; at: string }>>('GET', `/api/studies/${studyId}/audit?limit=500`)).body;
    const members = (await owner.call<Array<{ action: string }>>('GET', `/api/studies/${studyId}/audit?action=member.`)).body;
    expect(members.length).toBe(all.filter((e) => e.action.startsWith('member.')).length);
    expect(new Set(members.map((e) => e.action))).toEqual(new Set(['member.invite', 'member.join']));
    const invites = (await owner.call<Array<{ action: string }>>('GET', `/api/studies/${studyId}/audit?action=member.invite`)).body;
    expect(invites.every((e) => e.action === 'member.invite')).toBe(true);
    const me = (await owner.call<{ id: string }>('GET', '/api/me')).body.id;
    const mine = (await owner.call<Array<{ userId: string }>>('GET', `/api/studies/${studyId}/audit?userId=${me}`)).body;
    expect(mine.length).toBe(all.filter((e) => e.userId === me).length);
    const future = (await owner.call<unknown[]>('GET', `/api/studies/${studyId}/audit?from=2999-01-01`)).body;
    expect(future).toEqual([]);
    const until = (await owner.call<unknown[]>('GET', `/api/studies/${studyId}/audit?to=${encodeURIComponent(all[all.length - 1]!.at)}`)).body;
    expect(until.length).toBeGreaterThanOrEqual(1);
    expect((await owner.call('GET', `/api/studies/${studyId}/audit?from=yesterday-ish`)).status).toBe(400);
    expect((await owner.call('GET', `/api/studies/${studyId}/audit?action=${encodeURIComponent('x; drop')}`)).status).toBe(400);
  });

  it('describes the new routes in the OpenAPI document', async () => {
    const doc = (await apiClient(server.url).call<{ paths: Record<string, object> }>('GET', '/api/openapi.json')).body;
    for (const path of ['/api/setup', '/api/me/password', '/api/studies/{studyId}/invitations', '/api/studies/{studyId}/invitations/{invitationId}', '/api/studies/{studyId}/members/{userId}/reset-link', '/api/invitations/{token}', '/api/invitations/{token}/accept', '/api/password-resets/{token}', '/api/studies/{studyId}/texts/import/preview']) {
      expect(doc.paths, path).toHaveProperty([path]);
    }
  });
});

/** `gloss serve --no-demo` on an empty database (the CLI, as a person starts it): the code is printed and claims the server once. */
describe.each(dbKinds())('gloss serve --no-demo on %s', (kind) => {
  it('prints a set-up code before its listening line, seeds no demo, and the code creates the owner', async () => {
    const folder = kind === 'pglite' ? await freshPgliteDir() : null;
    const pg = kind === 'postgres' ? await freshPostgresDatabase() : null;
    const repo = new URL('../../', import.meta.url).pathname;
    const child = spawn(process.execPath, ['--import', 'tsx', 'apps/cli/src/main.ts', 'serve', '--no-demo'], {
      cwd: repo,
      env: { ...process.env, PORT: '0', LOG_LEVEL: 'warn', REDIS_URL: '', DATABASE_URL: pg?.url ?? '', DATA_DIR: folder?.dir ?? '' },
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    try {
      const events: Array<{ event: string; code?: string; url?: string }> = [];
      const lines = createInterface({ input: child.stdout! });
      let human = '';
      await new Promise<void>((resolve, reject) => {
        child.once('exit', (code) => reject(new Error(`gloss serve exited ${code}`)));
        lines.on('line', (line) => {
          human += line + '\n';
          if (!line.startsWith('{')) return;
          const e = JSON.parse(line) as { event: string };
          events.push(e);
          if (e.event === 'listening') resolve();
        });
      });
      expect(events.map((e) => e.event)).toEqual(['setup', 'listening']);
      const url = events[1]!.url!;
      expect(human).toContain('one-time set-up code');
      // no demo: the database holds no study and no account until the owner is made
      expect((await apiClient(url).call('GET', '/api/setup')).body).toEqual({ needed: true });
      const made = await post(url, '/api/setup', { code: events[0]!.code, email: 'olu.owner@example.test', name: 'Olu Owner', password: 'olu-password-1' });
      expect(made.status).toBe(201);
      expect((await apiClient(url, made.cookie!).call<unknown[]>('GET', '/api/studies')).body).toEqual([]);
      expect((await post(url, '/api/setup', { code: events[0]!.code, email: 'x@example.test', name: 'X', password: 'x-password-1' })).status).toBe(409);
    } finally {
      const exited = new Promise((r) => child.once('exit', r));
      child.kill('SIGTERM');
      await exited;
      folder?.remove();
      await pg?.drop();
    }
  }, 240_000);
});
