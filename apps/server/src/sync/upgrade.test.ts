/** Room names from upgrade URLs and HTTP statuses from authorizer errors (common practice: percent-decoding per RFC 3986). */
import { describe, expect, it } from 'vitest';
import { roomFromUrl, statusOf } from './upgrade.js';

describe('upgrade helpers', () => {
  it('takes the room from /sync/<room>, ignoring the query', () => {
    expect(roomFromUrl('/sync/8aa72ef1-6e7c-4c4b-8055-2bff177f8faa?as=coder')).toBe('8aa72ef1-6e7c-4c4b-8055-2bff177f8faa');
    expect(roomFromUrl('/sync/caf%C3%A9')).toBe('café');
    expect(roomFromUrl('/sync/')).toBeNull();
    expect(roomFromUrl('/api/sync/x')).toBeNull();
    expect(roomFromUrl('/sync/%E0%A4%A')).toBeNull();
    expect(roomFromUrl(undefined)).toBeNull();
  });

  it('reads status or statusCode from errors, else 500', () => {
    expect(statusOf(Object.assign(new Error('no'), { status: 403 }))).toBe(403);
    expect(statusOf({ statusCode: 401 })).toBe(401);
    expect(statusOf(new Error('boom'))).toBe(500);
    expect(statusOf({ status: 200 })).toBe(500);
  });
});
