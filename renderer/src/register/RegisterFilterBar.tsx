// The register's filters: native, labelled form controls in tab order (text, state, due status,
// construction, a frequency the meter must cover, flagged only), so they work from the keyboard
// and read correctly to a screen reader. A frequency that does not parse is named beside its
// box with the engine's own words and is not applied.
import { useId } from 'react';
import { useAnnounce } from '../shared/a11y';
import type { Construction, MeterState } from '../../../app/engine/model';
import { STATE_LABEL, SOON_DAYS } from '../shared/format';
import { NO_FILTERS, filtersActive, parseCoverFrequency } from './registerFilters';
import type { DueFilter, RegisterFilters } from './registerFilters';

const DUE_CHOICES: [DueFilter, string][] = [
  ['any', 'Any due status'],
  ['overdue', '⚠ Overdue'],
  ['soon', `Due within ${SOON_DAYS} d`],
  ['later', `Not due within ${SOON_DAYS} d`],
  // Never checked, or withdrawn.
  ['none', 'No due date'],
];

const STATES: MeterState[] = ['in-service', 'quarantined', 'withdrawn'];

export function RegisterFilterBar({
  filters,
  onChange,
  flagsReady,
}: {
  filters: RegisterFilters;
  onChange: (f: RegisterFilters) => void;
  flagsReady: boolean;
}) {
  const id = useId();
  const announce = useAnnounce();
  const set = <K extends keyof RegisterFilters>(key: K, value: RegisterFilters[K]) =>
    onChange({ ...filters, [key]: value });
  const freq = parseCoverFrequency(filters.frequency);
  const freqProblem = `${id}-freq-problem`;

  return (
    <form
      className="register-filters"
      role="search"
      aria-label="Filter the register"
      onSubmit={(e) => e.preventDefault()}
    >
      <div className="filter-field filter-text">
        <label htmlFor="meter-search">Find a meter</label>
        <input
          id="meter-search"
          type="search"
          placeholder="Asset id or description"
          autoComplete="off"
          spellCheck={false}
          value={filters.text}
          onChange={(e) => set('text', e.target.value)}
        />
      </div>
      <div className="filter-field">
        <label htmlFor={`${id}-state`}>State</label>
        <select
          id={`${id}-state`}
          value={filters.state}
          onChange={(e) => set('state', e.target.value as RegisterFilters['state'])}
        >
          <option value="any">Any state</option>
          {STATES.map((s) => (
            <option key={s} value={s}>
              {STATE_LABEL[s].symbol} {STATE_LABEL[s].word}
            </option>
          ))}
        </select>
      </div>
      <div className="filter-field">
        <label htmlFor={`${id}-due`}>Due</label>
        <select
          id={`${id}-due`}
          value={filters.due}
          onChange={(e) => set('due', e.target.value as DueFilter)}
        >
          {DUE_CHOICES.map(([value, word]) => (
            <option key={value} value={value}>
              {word}
            </option>
          ))}
        </select>
      </div>
      <div className="filter-field">
        <label htmlFor={`${id}-construction`}>Construction</label>
        <select
          id={`${id}-construction`}
          value={filters.construction}
          onChange={(e) => set('construction', e.target.value as Construction | 'any')}
        >
          <option value="any">Coaxial or waveguide</option>
          <option value="coaxial">Coaxial</option>
          <option value="waveguide">Waveguide</option>
        </select>
      </div>
      <div className="filter-field filter-frequency">
        <label htmlFor={`${id}-frequency`}>Covers frequency</label>
        <input
          id={`${id}-frequency`}
          type="text"
          inputMode="decimal"
          placeholder="e.g. 9.3 GHz"
          autoComplete="off"
          spellCheck={false}
          value={filters.frequency}
          aria-invalid={freq.kind === 'bad'}
          aria-describedby={freq.kind === 'bad' ? freqProblem : undefined}
          onChange={(e) => set('frequency', e.target.value)}
        />
      </div>
      <div className="filter-check">
        <input
          id={`${id}-flagged`}
          type="checkbox"
          checked={filters.flaggedOnly}
          onChange={(e) => set('flaggedOnly', e.target.checked)}
        />
        <label htmlFor={`${id}-flagged`}>
          <span aria-hidden="true">⚑ </span>Only meters with a drift or health flag
          {!flagsReady && <span className="muted"> (flags loading)</span>}
        </label>
      </div>
      <button
        type="button"
        className="button"
        aria-disabled={!filtersActive(filters)}
        onClick={() => {
          // Stays focusable once the filters are clear (aria-disabled), so focus is not dropped.
          if (!filtersActive(filters)) return;
          onChange(NO_FILTERS);
          announce('Filters cleared: every meter is shown.');
        }}
      >
        Clear filters
      </button>
      {freq.kind === 'bad' && (
        <p id={freqProblem} className="field-problem filter-problem" role="status">
          Frequency not applied: {freq.message}
        </p>
      )}
    </form>
  );
}
