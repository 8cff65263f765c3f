import { describe, expect, it } from 'vitest';
import { placeErrors, type FormFieldRef } from '@/lib/forms/place-errors';

const fields: FormFieldRef[] = [
  ['margins.data.value', 'margin-data'],
  ['margins.data.rationale', 'rationale-data'],
  ['finalValue', 'final-value'],
  ['reviewBy', 'review-by'],
];

describe('errors placed beside their fields', () => {
  it('puts each field error beside its field and says at the form how many need a change, without paths', () => {
    const p = placeErrors(
      {
        message: 'Give a rationale for the margin for data and method deficiencies (say why, even when the margin is 0).',
        field: 'margins.data.rationale',
        fieldErrors: {
          'margins.data.rationale': 'Give a rationale for the margin for data and method deficiencies (say why, even when the margin is 0).',
          reviewBy: 'The review-by date must be a calendar date written YYYY-MM-DD.',
        },
      },
      fields,
    );
    expect(p.byId).toEqual({
      'rationale-data': 'Give a rationale for the margin for data and method deficiencies (say why, even when the margin is 0).',
      'review-by': 'The review-by date must be a calendar date written YYYY-MM-DD.',
    });
    expect(p.order).toEqual(['rationale-data', 'review-by']);
    expect(p.formMessage).toBe('2 fields need a change: see the marked fields.');
    expect(p.formMessage).not.toMatch(/margins\.|reviewBy/);
  });

  it('places an error on a parent or child path and keeps the field order for the focus', () => {
    const p = placeErrors({ message: 'x', fieldErrors: { finalValue: 'Too low.', 'margins.data': 'Missing.' } }, fields);
    expect(p.order).toEqual(['margin-data', 'final-value']);
    expect(p.byId['margin-data']).toBe('Missing.');
  });

  it('says at the form what has no field on this form, and the message alone when nothing is placed', () => {
    const some = placeErrors({ message: 'Too low.', fieldErrors: { finalValue: 'Too low.', margins: 'The sum reaches 1.' } }, [['finalValue', 'f']]);
    expect(some.formMessage).toBe('One field needs a change: see the marked field. The sum reaches 1.');
    const none = placeErrors({ message: 'This fit has not finished.', field: 'fitId' }, fields);
    expect(none.byId).toEqual({});
    expect(none.formMessage).toBe('This fit has not finished.');
    expect(placeErrors(null, fields)).toEqual({ byId: {}, order: [], formMessage: null });
  });
});

describe('the problem of an error or a form state', () => {
  it('reads an AppError, a failed FormState, and ignores success and nothing', async () => {
    const { AppError } = await import('@/lib/errors');
    const { problemOf } = await import('@/lib/forms/place-errors');
    expect(problemOf(new AppError('invalid:x', 'Give a name.', { field: 'name', fieldErrors: { name: 'Give a name.' } }))).toEqual({
      message: 'Give a name.',
      field: 'name',
      fieldErrors: { name: 'Give a name.' },
    });
    expect(problemOf({ ok: false, message: 'Too short.', field: 'password', fieldErrors: { password: 'Too short.' } })).toEqual({
      message: 'Too short.',
      field: 'password',
      fieldErrors: { password: 'Too short.' },
    });
    expect(problemOf({ ok: true, message: 'Saved.' })).toBeNull();
    expect(problemOf({ ok: false, message: null })).toBeNull();
    expect(problemOf(new Error('Network down.'))).toEqual({ message: 'Network down.', field: null, fieldErrors: undefined });
    expect(problemOf(null)).toBeNull();
  });
});
