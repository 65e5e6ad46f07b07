import { createSignal, Show } from 'solid-js';
import { setupApi, type NewStudy, type StudyMode } from '../../api/setup-api.js';
import { createSubmit } from '../../ui/forms.js';

export const MODE_TEXT: Record<StudyMode, { label: string; hint: string }> = {
  standard: { label: 'Coding reliability', hint: 'Coders code independently; agreement between them is measured.' },
  reflexive: { label: 'Reflexive', hint: 'Coding is interpretive work; no agreement figures are computed.' },
};

/** The fields of a study's settings, shared by creation and the settings screen. */
export function StudyFields(props: { value: NewStudy; onChange: (v: NewStudy) => void; readOnly?: boolean }) {
  const set = <K extends keyof NewStudy>(k: K, v: NewStudy[K]) => props.onChange({ ...props.value, [k]: v });
  return (
    <fieldset class="study-fields" disabled={props.readOnly}>
      <label>Title<input name="title" required maxLength={200} value={props.value.title} onInput={(e) => set('title', e.currentTarget.value)} /></label>
      <label>Description<textarea name="description" rows={2} maxLength={5000} value={props.value.description} onInput={(e) => set('description', e.currentTarget.value)} /></label>
      <div role="radiogroup" aria-label="Mode" class="modes">
        {(['standard', 'reflexive'] as const).map((m) => (
          <label class="check">
            <input type="radio" name="mode" value={m} checked={props.value.mode === m} onChange={() => set('mode', m)} />
            <span><strong>{MODE_TEXT[m].label}</strong> — {MODE_TEXT[m].hint}</span>
          </label>
        ))}
      </div>
      <label>
        Delete the data after (retention date)
        <input type="date" name="retention" value={props.value.retentionUntil?.slice(0, 10) ?? ''} onInput={(e) => set('retentionUntil', e.currentTarget.value ? `${e.currentTarget.value}T00:00:00.000Z` : null)} />
      </label>
      <label>
        Ethics approval and consent (your own note: board, reference, what participants agreed to)
        <textarea name="ethics" rows={3} maxLength={10000} value={props.value.ethicsNote} onInput={(e) => set('ethicsNote', e.currentTarget.value)} />
      </label>
    </fieldset>
  );
}

export const emptyStudy = (): NewStudy => ({ title: '', description: '', mode: 'standard', retentionUntil: null, ethicsNote: '' });

export function NewStudyForm(props: { onCreated: (id: string) => void }) {
  const [value, setValue] = createSignal(emptyStudy());
  const submit = createSubmit();
  const onSubmit = (e: Event) => {
    e.preventDefault();
    void submit.run(async () => props.onCreated((await setupApi.createStudy(value())).id));
  };
  return (
    <form onSubmit={onSubmit} aria-label="Create a study" class="stacked">
      <StudyFields value={value()} onChange={setValue} />
      <Show when={submit.error()}><p class="error" role="alert">{submit.error()}</p></Show>
      <button type="submit" disabled={submit.busy()}>Create the study</button>
    </form>
  );
}
