import { describe, expect, it } from 'vitest';
import { createReadiness } from './readiness.js';

describe('readiness', () => {
  it('is ready only once every pending step is done, and names what is pending (common practice: a readiness probe)', () => {
    const r = createReadiness();
    expect(r.ready()).toBe(true);
    const demo = r.wait('demo study seeding');
    const sync = r.wait('sync attaching');
    expect(r.pending()).toEqual(['demo study seeding', 'sync attaching']);
    sync();
    expect([r.ready(), r.pending()]).toEqual([false, ['demo study seeding']]);
    demo();
    demo(); // done twice changes nothing
    expect([r.ready(), r.pending()]).toEqual([true, []]);
  });
});
