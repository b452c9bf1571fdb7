// The smaller parts of the record form: the draft bar and list of unfinished drafts, a number
// box with its unit, the review before recording, and the problems that stopped a recording.
import { useId } from 'react';
import type { LabSettings } from '../../../app/api/contract';
import type { DraftSummary } from '../../../app/api/contract-drafts';
import type { FieldIssue } from '../../../app/api/errors';
import type { PointResult } from '../../../app/engine/model';
import { useLab } from '../lab/LabContext';
import { VERDICT_LABEL } from '../shared/format';
import { href } from '../shared/routes';
import { DEFAULT_READINGS_PER_DIRECTION } from './checkForm';
import type { CheckForm } from './checkForm';
import type { SaveState } from './useDraftAutosave';

export type RecordState =
  { kind: 'idle' } | { kind: 'busy' } | { kind: 'failed'; message: string; issues: FieldIssue[] };

export function perDirection(f: CheckForm): number {
  return f.points[0]?.up.length ?? DEFAULT_READINGS_PER_DIRECTION;
}

export function DraftBar({ save, onDiscard }: { save: SaveState; onDiscard: () => void }) {
  const text =
    save.kind === 'none'
      ? 'Not saved yet: the draft is kept from the first thing you type.'
      : save.kind === 'saving'
        ? 'Saving the draft…'
        : save.kind === 'saved'
          ? `✓ Draft ${save.draftId} saved${save.at ? ` at ${save.at.slice(11, 19)}` : ''}`
          : `✗ The draft was not saved: ${save.message}`;
  return (
    <div className={`draft-bar draft-${save.kind}`}>
      <p role="status" aria-live="polite" data-testid="draft-status">
        {text}
      </p>
      {save.kind === 'saved' && (
        <button type="button" className="link" onClick={onDiscard}>
          Discard this draft
        </button>
      )}
    </div>
  );
}

export function DraftList({ drafts, onGone }: { drafts: DraftSummary[]; onGone: (id: number) => void }) {
  const api = useLab();
  return (
    <section className="drafts" aria-label="Unfinished drafts">
      <h2>Unfinished drafts</h2>
      <ul>
        {drafts.map((d) => (
          <li key={d.draftId} data-draft-id={d.draftId}>
            <a href={href.draft(d.draftId)}>
              Draft {d.draftId}: {d.meterAssetId ?? 'no meter yet'}
              {d.date ? `, ${d.date}` : ''}
            </a>{' '}
            <span className="muted">
              {d.pointsStarted} of {d.pointCount} points started · saved{' '}
              {d.updatedAt.slice(0, 16).replace('T', ' ')}
            </span>{' '}
            <button
              type="button"
              className="link"
              onClick={() => void api.discardDraft(d.draftId).then(() => onGone(d.draftId))}
            >
              Discard
            </button>
          </li>
        ))}
      </ul>
    </section>
  );
}

export function NumberField({
  label,
  unit,
  value,
  onChange,
  field,
}: {
  label: string;
  unit: string;
  value: string;
  onChange: (v: string) => void;
  /** The field's path in the check document, so a refusal can point at this box. */
  field?: string;
}) {
  const id = useId();
  return (
    <div className="field">
      <label htmlFor={id}>
        {label} / {unit}
      </label>
      <span className="with-unit">
        <input
          id={id}
          type="text"
          inputMode="decimal"
          className="num-input"
          data-field={field}
          value={value}
          onChange={(e) => onChange(e.target.value)}
        />
        <span className="unit" aria-hidden="true">
          {unit}
        </span>
      </span>
    </div>
  );
}

const RULE_WORDS: Record<LabSettings['decisionRule']['kind'], string> = {
  simple: 'simple acceptance (no guard band)',
  guarded: 'guarded acceptance',
  'guarded-fixed': 'guarded acceptance with a fixed guard band',
  'non-binary': 'non-binary (pass, conditional pass, conditional fail, fail)',
};

export function Review({
  form,
  verdicts,
  lab,
}: {
  form: CheckForm;
  verdicts: PointResult[];
  lab: LabSettings;
}) {
  const counts = new Map<string, number>();
  for (const r of verdicts) counts.set(r.decision.verdict, (counts.get(r.decision.verdict) ?? 0) + 1);
  const rule = lab.decisionRule;
  return (
    <div className="review" data-testid="review">
      <p>
        {form.method === 'sweep'
          ? `${form.points.filter((p) => p.sweep).length} of ${form.points.length} points have a trace attached`
          : `${verdicts.length} of ${form.points.length} points judged`}
        {verdicts.length > 0 && ': '}
        {[...counts.entries()]
          .map(
            ([v, n]) =>
              `${n} ${VERDICT_LABEL[v as keyof typeof VERDICT_LABEL].symbol} ${VERDICT_LABEL[v as keyof typeof VERDICT_LABEL].word.toLowerCase()}`,
          )
          .join(', ')}
        .
      </p>
      <p className="hint">
        Decision rule: {RULE_WORDS[rule.kind]}
        {rule.kind === 'guarded' ? `, guard band ${rule.multipleOfU} × U` : ''}
        {rule.kind === 'guarded-fixed' ? `, guard band ${rule.guardBandPpm} ppm` : ''}. Live figures use each
        standard’s certificate valid today; the record uses the one valid on the check date. The verdicts
        support, and never replace, your lab’s quality system.
      </p>
    </div>
  );
}

/** The id of the message about the k-th problem of a refusal. */
export const problemId = (base: string, k: number) => `${base}-problem-${k}`;

export function RecordProblems({
  state,
  idBase,
}: {
  state: Extract<RecordState, { kind: 'failed' }>;
  idBase: string;
}) {
  const words = (field: string) =>
    field.replace(/^points\[(\d+)\]/, (_, n: string) => `Point ${Number(n) + 1}`);
  return (
    <div className="problems" role="alert" id={idBase}>
      <p>
        <strong>
          <span aria-hidden="true">✗ </span>Not recorded; nothing was written.
        </strong>{' '}
        {state.issues.length === 0 ? state.message : 'Put these right and record again:'}
      </p>
      {state.issues.length > 0 && (
        <ul>
          {state.issues.map((i, k) => (
            <li key={k} id={problemId(idBase, k)}>
              <strong>{words(i.field)}</strong>: {i.message.replace(`${i.field}: `, '')}
            </li>
          ))}
        </ul>
      )}
    </div>
  );
}
