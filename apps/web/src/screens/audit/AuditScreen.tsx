import { createResource, createSignal, For, Show } from 'solid-js';
import { api } from '../../api/client.js';
import { setupApi, type AuditEntry } from '../../api/setup-api.js';
import { Loading } from '../../ui/Loading.js';
import type { StudyScope } from '../study/study-context.js';
import { StudyNav, allowed } from '../study/StudyNav.js';

const PAGE = 200;

/** Families of logged actions, in words (the log's own action names are shown beside). */
const FAMILIES: Array<{ value: string; label: string }> = [
  { value: '', label: 'everything' },
  { value: 'segments.', label: 'viewing others’ coding' },
  { value: 'layer.', label: 'opening layers' },
  { value: 'text.', label: 'texts (import, delete…)' },
  { value: 'export.', label: 'exports' },
  { value: 'member.', label: 'members and invitations' },
  { value: 'account.', label: 'passwords' },
  { value: 'version.', label: 'named versions' },
  { value: 'study.', label: 'study settings' },
  { value: 'deid.', label: 'de-identification and purges' },
];

interface Filters { action: string; userId: string; from: string; to: string }

/** The study's access and change log for owners and leads: who did what, when; filtered on the server. */
export function AuditScreen(props: { studyId: string; scope: StudyScope }) {
  const [members] = createResource(() => props.studyId, (id) => api.members(id).catch(() => []));
  const [filters, setFilters] = createSignal<Filters>({ action: '', userId: '', from: '', to: '' });
  const [older, setOlder] = createSignal<AuditEntry[]>([]);
  const query = (f: Filters, before?: number) =>
    setupApi.audit(props.studyId, {
      action: f.action,
      userId: f.userId,
      from: f.from ? new Date(`${f.from}T00:00:00`).toISOString() : '',
      to: f.to ? new Date(`${f.to}T23:59:59.999`).toISOString() : '',
      limit: PAGE,
      ...(before ? { before } : {}),
    });
  const [entries] = createResource(filters, (f) => {
    setOlder([]);
    return query(f);
  });
  const all = () => [...(entries() ?? []), ...older()];
  const [more, setMore] = createSignal(false);
  const loadOlder = async () => {
    const last = all()[all().length - 1];
    if (!last) return;
    setMore(true);
    try {
      setOlder([...older(), ...(await query(filters(), last.id))]);
    } finally {
      setMore(false);
    }
  };
  const set = (k: keyof Filters, v: string) => setFilters({ ...filters(), [k]: v });
  return (
    <main class="page">
      <StudyNav studyId={props.studyId} scope={props.scope} current="audit" />
      <h2>Audit log</h2>
      <Show when={allowed(props.scope, 'audit.view') || !props.scope.study()} fallback={<p>Only owners and leads see the audit log.</p>}>
        <p class="muted">Who viewed whose coding, imported, exported, invited, changed or deleted what, and when. Entries keep no transcript content.</p>
        <form class="inline-form filters" aria-label="Filter the log" onSubmit={(e) => e.preventDefault()}>
          <label>What
            <select value={filters().action} onChange={(e) => set('action', e.currentTarget.value)}>
              <For each={FAMILIES}>{(f) => <option value={f.value}>{f.label}</option>}</For>
            </select>
          </label>
          <label>Who
            <select value={filters().userId} onChange={(e) => set('userId', e.currentTarget.value)}>
              <option value="">anyone</option>
              <For each={members()}>{(m) => <option value={m.userId}>{m.name}</option>}</For>
            </select>
          </label>
          <label>From<input type="date" value={filters().from} onChange={(e) => set('from', e.currentTarget.value)} /></label>
          <label>To<input type="date" value={filters().to} onChange={(e) => set('to', e.currentTarget.value)} /></label>
        </form>
        <Loading loading={entries.loading} error={entries.error} what="the log">
          <table class="audit" aria-label="Log entries">
            <thead><tr><th scope="col">When</th><th scope="col">Who</th><th scope="col">What</th><th scope="col">Details</th></tr></thead>
            <tbody>
              <For each={all()} fallback={<tr><td colSpan={4}>Nothing logged matches these filters.</td></tr>}>
                {(e) => (
                  <tr>
                    <td><time datetime={e.at}>{new Date(e.at).toLocaleString(undefined, { dateStyle: 'medium', timeStyle: 'medium' })}</time></td>
                    <td>{e.userName ?? (e.userId ? 'a former account' : 'the system')}</td>
                    <td><code>{e.action}</code></td>
                    <td class="detail">{describe(e)}</td>
                  </tr>
                )}
              </For>
            </tbody>
          </table>
          <Show when={(entries()?.length ?? 0) >= PAGE && all().length % PAGE === 0}>
            <button type="button" class="quiet" disabled={more()} onClick={() => void loadOlder()}>Show older entries</button>
          </Show>
        </Loading>
      </Show>
    </main>
  );
}

function describe(e: AuditEntry): string {
  const d = e.detail ?? {};
  const parts = Object.entries(d)
    .filter(([, v]) => v !== null && v !== undefined && typeof v !== 'object')
    .map(([k, v]) => `${k}: ${String(v)}`);
  if (Array.isArray(d.coderIds)) parts.push(`${d.coderIds.length} other coder(s)`);
  return parts.join(' · ');
}
