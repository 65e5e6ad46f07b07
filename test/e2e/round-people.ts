/** The invented third coder that serve-demo.ts creates for the calibration-round test (no study yet). */
export const EXTRA = { email: 'coder3@example.org', password: 'gloss-e2e-coder3', role: 'coder', name: 'Oriel Fenwick-Dao' };
