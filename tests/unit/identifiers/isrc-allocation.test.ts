import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import {
  allocateIsrcs,
  allocateNextIsrc,
  parseRegistrantPrefix,
  yearOfReferenceFor,
} from '@/lib/identifiers';

describe('allocateNextIsrc', () => {
  it('starts at the beginning of the range when nothing was issued', () => {
    expect(
      allocateNextIsrc({ registrantPrefix: 'qz-9ab', yearOfReference: 26, issued: [] }),
    ).toEqual({ ok: true, isrc: 'QZ9AB2600000', designation: 0 });
  });

  it('continues after the highest code ever issued, never filling holes', () => {
    const result = allocateNextIsrc({
      registrantPrefix: 'QZ9AB',
      yearOfReference: '26',
      issued: ['QZ-9AB-26-00001', 'QZ9AB2600007', 'QZ9AB2600003'],
    });
    expect(result).toEqual({ ok: true, isrc: 'QZ9AB2600008', designation: 8 });
  });

  it('ignores codes of other prefixes, other years and unreadable entries', () => {
    const result = allocateNextIsrc({
      registrantPrefix: 'QZ9AB',
      yearOfReference: '26',
      issued: ['QZ9AB2500900', 'QZ9AC2600900', 'not an isrc', 'QZ9AB2600002'],
    });
    expect(result).toMatchObject({ ok: true, isrc: 'QZ9AB2600003' });
  });

  it('stays inside an allotted sub-range', () => {
    const range = { first: 500, last: 502 };
    const first = allocateNextIsrc({
      registrantPrefix: 'GX1AA',
      yearOfReference: 5,
      range,
      issued: ['GX1AA0500010'],
    });
    expect(first).toMatchObject({ ok: true, isrc: 'GX1AA0500500' });
    const exhausted = allocateNextIsrc({
      registrantPrefix: 'GX1AA',
      yearOfReference: '05',
      range,
      issued: ['GX1AA0500502'],
    });
    expect(exhausted).toMatchObject({ ok: false, code: 'range-exhausted' });
    if (!exhausted.ok) expect(exhausted.message).toMatch(/00500 to 00502.*GX1AA, year 05/);
  });

  it('reports the whole range exhausted at 99999', () => {
    const result = allocateNextIsrc({
      registrantPrefix: 'QZ9AB',
      yearOfReference: '26',
      issued: ['QZ9AB2699999'],
    });
    expect(result).toMatchObject({ ok: false, code: 'range-exhausted' });
  });

  it.each([
    [{ registrantPrefix: 'Q9ZAB', yearOfReference: '26' }, 'invalid-prefix'],
    [{ registrantPrefix: 'QZ9A', yearOfReference: '26' }, 'invalid-prefix'],
    [{ registrantPrefix: 'QZ9AB', yearOfReference: '2026' }, 'invalid-year'],
    [{ registrantPrefix: 'QZ9AB', yearOfReference: 100 }, 'invalid-year'],
    [
      { registrantPrefix: 'QZ9AB', yearOfReference: '26', range: { first: 9, last: 3 } },
      'invalid-range',
    ],
    [
      { registrantPrefix: 'QZ9AB', yearOfReference: '26', range: { first: 0, last: 100_000 } },
      'invalid-range',
    ],
  ])('rejects bad input %j with %s', (request, code) => {
    expect(allocateNextIsrc({ ...request, issued: [] })).toMatchObject({ ok: false, code });
  });
});

describe('allocateIsrcs', () => {
  it('hands out consecutive codes for all tracks missing one, in order', () => {
    expect(
      allocateIsrcs(
        { registrantPrefix: 'QZ9AB', yearOfReference: 26, issued: ['QZ9AB2600041'] },
        3,
      ),
    ).toEqual({
      ok: true,
      designations: [42, 43, 44],
      isrcs: ['QZ9AB2600042', 'QZ9AB2600043', 'QZ9AB2600044'],
    });
  });

  it('refuses the whole batch when the range cannot hold it', () => {
    const result = allocateIsrcs(
      {
        registrantPrefix: 'QZ9AB',
        yearOfReference: 26,
        range: { first: 0, last: 9 },
        issued: ['QZ9AB2600008'],
      },
      2,
    );
    expect(result).toMatchObject({ ok: false, code: 'range-exhausted' });
    if (!result.ok)
      expect(result.message).toBe(
        'Only 1 designation code remains for QZ9AB, year 26 (up to 00009), but 2 were requested.',
      );
  });

  it('rejects a count below one', () => {
    expect(
      allocateIsrcs({ registrantPrefix: 'QZ9AB', yearOfReference: 26, issued: [] }, 0),
    ).toMatchObject({
      ok: false,
      code: 'invalid-count',
    });
  });

  it('never returns a code that was already issued, and never repeats one', () => {
    fc.assert(
      fc.property(
        fc.uniqueArray(fc.integer({ min: 0, max: 999 }), { maxLength: 40 }),
        fc.integer({ min: 1, max: 20 }),
        (used, count) => {
          const issued = used.map((d) => `QZ9AB26${String(d).padStart(5, '0')}`);
          const result = allocateIsrcs(
            { registrantPrefix: 'QZ9AB', yearOfReference: 26, issued },
            count,
          );
          if (!result.ok) return false;
          const fresh = new Set(result.isrcs);
          return fresh.size === count && result.isrcs.every((code) => !issued.includes(code));
        },
      ),
    );
  });
});

describe('helpers', () => {
  it('normalises a registrant prefix', () => {
    expect(parseRegistrantPrefix(' qz-9ab ')).toEqual({ ok: true, value: 'QZ9AB' });
  });

  it('takes the year of reference from the UTC year', () => {
    expect(yearOfReferenceFor(new Date('2026-12-31T23:30:00Z'))).toBe('26');
    expect(yearOfReferenceFor(new Date('2105-01-01T00:00:00Z'))).toBe('05');
  });
});
