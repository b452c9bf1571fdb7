// A refusal as every form shows it: what was not done and that nothing changed, then each problem
// the service named (field, value, what was expected), or its message when it named none.
import type { FieldIssue } from '../../../app/api/errors';
import { messageForPeople } from '../../../app/model/field-labels';

export function Problems({
  verb,
  state,
}: {
  verb: string;
  state: { message: string; issues: FieldIssue[] };
}) {
  return (
    <div className="problems" role="alert">
      <p>
        <strong>✗ {verb}; nothing was changed.</strong>{' '}
        {state.issues.length === 0 && messageForPeople(state.message)}
      </p>
      <ul>
        {state.issues.map((i, k) => (
          <li key={k}>{messageForPeople(i.message, i.field)}</li>
        ))}
      </ul>
    </div>
  );
}
