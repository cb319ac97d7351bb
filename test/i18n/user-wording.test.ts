import { describe, expect, it } from 'vitest';
import { ASSUMED_WORDING, userWording, withUserWording } from '../../src/i18n/user-wording.js';

// The texts below are the reference tables' own source notes (src/phosphorus/natural-ratios.ts,
// src/phosphorus/absorption.ts, src/binders/catalogue.ts); no expected value needs a source.
describe('what users read for figures with no published source', () => {
  it.each([
    ['little phytate in fruit (from memory)', `little phytate in fruit [${ASSUMED_WORDING}]`],
    [
      'milling removes most bran phytate; 30% assumed (from memory, no source)',
      `milling removes most bran phytate; 30% assumed [${ASSUMED_WORDING}]`,
    ],
    [
      'IOM 1997 DRI report, ch. 5; from memory) and Schiller 1989',
      `IOM 1997 DRI report, ch. 5; ${ASSUMED_WORDING}) and Schiller 1989`,
    ],
    [
      'take with meals [V]; swallow whole [from memory]',
      `take with meals [V]; swallow whole [${ASSUMED_WORDING}]`,
    ],
    [
      'consumer drug information (label wording from memory)',
      `consumer drug information (label wording ${ASSUMED_WORDING})`,
    ],
    ['KDOQI 2020', 'KDOQI 2020'],
  ])('%s', (from, to) => {
    expect(userWording(from)).toBe(to);
    expect(userWording(from)).not.toMatch(/from memory/i);
  });

  it('walks answers deeply and copies only what changes', () => {
    const untouched = { a: ['KDOQI 2020'], b: { c: 1 } };
    expect(withUserWording(untouched)).toBe(untouched);
    const answer = {
      key: 'absorption',
      source: 'x (from memory)',
      list: [{ s: 'from memory' }, 2],
    };
    const shown = withUserWording(answer);
    expect(shown).toEqual({
      key: 'absorption',
      source: `x [${ASSUMED_WORDING}]`,
      list: [{ s: ASSUMED_WORDING }, 2],
    });
    expect(answer.source).toBe('x (from memory)'); // the reference value itself is not changed
  });
});
