import { useState, type FormEvent } from 'react';
import { STUDY_STATUS_LABELS } from '../../../../shared/studies/status-labels.ts';
import type { StudyDto } from '../../../../shared/studies/study-dto.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextAreaField } from '../../../components/ui/field.tsx';
import { ErrorNotice } from '../../../components/ui/page-state.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useStudyAction } from '../api/review.ts';
import { formatDateTime } from './format-date.ts';

const when = (iso: string | null) => (iso ? formatDateTime(iso) : '');

function stateLine(study: StudyDto): string {
  switch (study.status) {
    case 'draft':
      return `Revision ${study.revision} is being prepared by ${study.createdBy.displayName}.`;
    case 'returned':
      return 'Returned for changes: see the thread below, change what it asks and submit again.';
    case 'submitted':
      return `Submitted for review ${when(study.submittedAt)}. A physicist returns it with comments or signs it.`;
    case 'signed':
      return `Signed by ${study.signedBy?.displayName ?? 'a physicist'} ${when(study.signedAt)}${
        study.selfSigned ? ' (signed by its own author)' : ''
      }. This revision is read-only.`;
  }
}

/** The study's state and the review actions the viewer may take now. */
export function ReviewPanel({ study }: { study: StudyDto }) {
  const act = useStudyAction(study.id);
  const [mode, setMode] = useState<'idle' | 'return' | 'sign'>('idle');
  const [note, setNote] = useState('');
  const p = study.permissions;
  const fieldError =
    act.error instanceof ApiError
      ? act.error.fieldMessage('comment')
      : undefined;

  const done = () => {
    setMode('idle');
    setNote('');
  };
  const handleSubmitForm = (event: FormEvent) => {
    event.preventDefault();
    if (mode === 'return')
      act.mutate({ action: 'return', comment: note }, { onSuccess: done });
    if (mode === 'sign')
      act.mutate(
        { action: 'sign', comment: note || undefined },
        { onSuccess: done },
      );
  };

  const anyAction = p.submit || p.return || p.sign || p.revise;
  return (
    <div className="space-y-4">
      <p className="text-sm text-slate-800" data-testid="review-state">
        <span className="font-semibold">
          {STUDY_STATUS_LABELS[study.status]}.
        </span>{' '}
        {stateLine(study)}
      </p>
      {mode === 'idle' && anyAction && (
        <div className="flex flex-wrap gap-3" data-print="hide">
          {p.submit && (
            <Button
              onClick={() => act.mutate({ action: 'submit' })}
              disabled={act.isPending}
            >
              Submit for review
            </Button>
          )}
          {p.return && (
            <Button variant="secondary" onClick={() => setMode('return')}>
              Return with comments
            </Button>
          )}
          {p.sign && <Button onClick={() => setMode('sign')}>Sign off</Button>}
          {p.revise && (
            <Button
              variant="secondary"
              onClick={() => act.mutate({ action: 'revise' })}
              disabled={act.isPending}
            >
              Start revision {study.revision + 1}
            </Button>
          )}
        </div>
      )}
      {!anyAction && study.status !== 'signed' && (
        <p className="text-sm text-slate-500">
          {study.status === 'submitted'
            ? 'Only a physicist returns or signs a study.'
            : 'You can read this study; its author or a physicist changes it.'}
        </p>
      )}
      {mode !== 'idle' && (
        <form
          onSubmit={handleSubmitForm}
          className="space-y-3 rounded-lg bg-lamina-50 p-4"
          aria-label={mode === 'return' ? 'Return the study' : 'Sign the study'}
        >
          <TextAreaField
            label={
              mode === 'return'
                ? 'What must change (sent to the author)'
                : 'Note with the signature (optional)'
            }
            rows={3}
            value={note}
            onChange={(e) => setNote(e.target.value)}
            error={fieldError}
          />
          {mode === 'sign' && (
            <p className="text-sm text-slate-700">
              Signing freezes revision {study.revision}: it cannot change
              afterwards, and any later change makes revision{' '}
              {study.revision + 1}.
            </p>
          )}
          <div className="flex gap-3">
            <Button type="submit" disabled={act.isPending}>
              {mode === 'return'
                ? 'Send back to the author'
                : `Sign revision ${study.revision}`}
            </Button>
            <Button variant="quiet" onClick={done}>
              Cancel
            </Button>
          </div>
        </form>
      )}
      {act.isError && !fieldError && <ErrorNotice error={act.error} />}
    </div>
  );
}
