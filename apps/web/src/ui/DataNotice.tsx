/** The data-protection reminder (DESIGN §8). Gloss defers to the ethics board; it does not make a study compliant. */
export function DataNotice(props: { compact?: boolean }) {
  return (
    <aside class="data-notice" aria-label="Data protection">
      <strong>Personal data.</strong>{' '}
      {props.compact ? (
        <span>Transcripts are personal data: follow your ethics approval, consent terms and the law that applies (e.g. the GDPR).</span>
      ) : (
        <span>
          Interview transcripts are personal, often sensitive, data. Follow the study's ethics approval and consent terms and the
          data-protection law that applies (for example the GDPR's rules for special-category data). De-identify before sharing and keep the
          pseudonym key apart from the texts. Exports carry text and coder names; memos can leak identifiers. Set a retention date. Your
          ethics board and data-protection officer have the last word.
        </span>
      )}
    </aside>
  );
}
