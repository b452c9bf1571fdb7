// Refusals name fields as the forms do (common practice of this product: the labels are those of
// the record, meter and settings forms), while programs keep the machine path.
import { describe, expect, it } from 'vitest';
import { fieldLabel, messageForPeople } from '../../app/model/field-labels';

describe('field labels', () => {
  it('turns machine paths into the form names, counting items from 1', () => {
    expect(fieldLabel('readings[1].value')).toBe('Reading 2, value');
    expect(fieldLabel('points[2].readings[0].value')).toBe('Point 3, reading 1, value');
    expect(fieldLabel('intervalMinMonths')).toBe('Shortest interval (months)');
    expect(fieldLabel('replaceReason')).toBe('Reason for the new revision');
    expect(fieldLabel('conditions.humidityPct')).toBe('Relative humidity (%RH)');
    expect(fieldLabel('--temp')).toBe('--temp');
  });

  it('rewrites a message, leaving quoted values as typed', () => {
    expect(
      messageForPeople('readings[1].value: "intervalMinMonths" is not a frequency', 'readings[1].value'),
    ).toBe('Reading 2, value: "intervalMinMonths" is not a frequency');
    expect(
      messageForPeople('intervalMinMonths: 40 is more than intervalMaxMonths (36)', 'intervalMinMonths'),
    ).toBe('Shortest interval (months): 40 is more than Longest interval (months) (36)');
    expect(messageForPeople('replaceReason: missing; say why', 'replaceReason')).toBe(
      'Reason for the new revision: missing; say why',
    );
    expect(messageForPeople('meter WG-201 was not found')).toBe('meter WG-201 was not found');
  });
});
