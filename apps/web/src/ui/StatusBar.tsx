/** Always-visible connection status, what is waiting to be sent, and the work-offline switch. */
import { For, Show, createSignal } from 'solid-js';
import { countOf } from './count-words.js';
import { lostAccess, openDocs, overall, refusedChanges, waiting } from '../sync/status.js';
import { isPaused, RELOAD_NOTICE_KEY, setPaused } from '../sync/open-doc.js';
import { DataNotice } from './DataNotice.js';

const WORDS = {
  idle: 'No documents open',
  online: 'Connected: changes are shared as you make them',
  connecting: 'Connecting…',
  offline: 'Offline: your changes are kept on this device',
  paused: 'Working offline: syncing paused',
  lost: 'Access ended by the server',
} as const;

/** Why the page just reloaded (a document replaced by a purge), read once and forgotten. */
function takeReloadNotice(): string | null {
  const notice = sessionStorage.getItem(RELOAD_NOTICE_KEY);
  sessionStorage.removeItem(RELOAD_NOTICE_KEY);
  return notice;
}

export function StatusBar() {
  const [paused, setP] = createSignal(isPaused());
  const [reloadNotice, setReloadNotice] = createSignal(takeReloadNotice());
  const toggle = () => {
    setPaused(!paused());
    setP(!paused());
  };
  return (
    <footer class="status-bar">
      <Show when={reloadNotice()}>
        <div class="status-line refused" role="alert" data-testid="reload-notice">
          <span>{reloadNotice()}</span>
          <button type="button" class="link" onClick={() => setReloadNotice(null)}>Dismiss</button>
        </div>
      </Show>
      <For each={refusedChanges()}>
        {(r) => (
          <div class="status-line refused" role="alert" data-testid="refused-change">
            <span>Not saved — the server refused your change to {r.doc.label}: {r.reason} Your copy on this device still shows it.</span>
            <button type="button" class="link" onClick={() => void r.doc.discardLocalCopy()}>Discard it and reload</button>
            <button type="button" class="link" onClick={() => r.doc.dismissRefusal()}>Dismiss</button>
          </div>
        )}
      </For>
      <div class="status-line" role="status" aria-live="polite" data-testid="connection-status" data-state={overall()}>
        <span class={`dot dot-${overall()}`} aria-hidden="true" />
        <span>{WORDS[overall()]}</span>
        <Show when={lostAccess().length > 0}>
          <span class="lost" data-testid="lost-access">
            {lostAccess().join(' ')} Changes you make here now are not shared.
          </span>
        </Show>
        <Show when={waiting().length > 0} fallback={<span class="sent" data-testid="waiting">Nothing waiting to be sent.</span>}>
          <span class="waiting" data-testid="waiting">
            Waiting to be sent:{' '}
            <For each={waiting()}>{(w, i) => <>{i() > 0 ? '; ' : ''}{countOf(w.count, 'change')} to {w.label}</>}</For>
          </span>
        </Show>
        <Show when={openDocs().length > 0 || paused()}>
          <button type="button" class="link" onClick={toggle} aria-pressed={paused()}>
            {paused() ? 'Resume syncing' : 'Work offline'}
          </button>
        </Show>
      </div>
      <DataNotice compact />
    </footer>
  );
}
