import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { iso } from '@/lib/db/mappers';

/** Sequelize's text form of a DATE on SQLite (its sqlite DATE type: 'YYYY-MM-DD HH:mm:ss.SSS Z', UTC). */
const sqliteText = (d: Date) => d.toISOString().replace('T', ' ').replace('Z', ' +00:00');

describe('iso', () => {
  it('rewrites the SQLite text form to the same instant as Date would, for any instant from 1900 to 2200', () => {
    fc.assert(
      fc.property(fc.date({ min: new Date('1900-01-01T00:00:00Z'), max: new Date('2200-01-01T00:00:00Z'), noInvalidDate: true }), (d) => {
        const text = sqliteText(d);
        expect(iso(text)).toBe(new Date(text).toISOString());
        expect(iso(text)).toBe(d.toISOString());
      }),
      { numRuns: 2000 },
    );
  });

  it('passes Dates (PostgreSQL), other text forms and null through Date', () => {
    const d = new Date('2026-03-04T05:06:07.089Z');
    expect(iso(d)).toBe('2026-03-04T05:06:07.089Z');
    expect(iso('2026-03-04 07:06:07.089 +02:00')).toBe('2026-03-04T05:06:07.089Z');
    expect(iso('2026-03-04T05:06:07Z')).toBe('2026-03-04T05:06:07.000Z');
    expect(iso(null)).toBeNull();
    expect(iso(undefined)).toBeNull();
  });
});
