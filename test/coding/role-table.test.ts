// The coding view's copy of the role table (apps/web/src/screens/coding/coding-actions.ts) against the
// server's own (apps/server/src/access/policy.ts), which is what actually decides: they must agree for
// every role and every permission the coding view uses.
import { describe, expect, it } from 'vitest';
import { can, ACTIONS } from '../../apps/server/src/access/policy.js';
import { ACTION_RULES, ROLE_PERMISSIONS, decide, type CodingAction } from '../../apps/web/src/screens/coding/coding-actions.js';

const ROLES = ['owner', 'lead', 'coder', 'trainee', 'observer'] as const;

describe('coding view role table', () => {
  it('holds exactly the permissions the server grants each role', () => {
    const used = [...new Set(Object.values(ACTION_RULES).flatMap((r) => [r.needs, ...(r.direct ? [r.direct] : [])]))];
    for (const p of used) expect(ACTIONS as readonly string[]).toContain(p);
    for (const role of ROLES) {
      expect([...ROLE_PERMISSIONS[role]].sort()).toEqual(used.filter((p) => can(role, p as (typeof ACTIONS)[number])).sort());
    }
  });

  it('decides every action as the server\'s permission list for the role would', () => {
    for (const role of ROLES) {
      const serverList = ACTIONS.filter((a) => can(role, a));
      for (const a of Object.keys(ACTION_RULES) as CodingAction[]) {
        expect(decide(role, a)).toEqual(decide(role, a, { permissions: serverList }));
      }
    }
  });
});
