import { useState, type FormEvent } from 'react';
import type { StudyCommentDto } from '../../../../shared/studies/study-dto.ts';
import { Button } from '../../../components/ui/button.tsx';
import { TextAreaField } from '../../../components/ui/field.tsx';
import {
  Empty,
  ErrorNotice,
  Loading,
} from '../../../components/ui/page-state.tsx';
import { ApiError } from '../../../lib/api-client.ts';
import { useAddComment, useComments } from '../api/review.ts';
import { formatDateTime } from './format-date.ts';

const KIND_LABELS: Record<StudyCommentDto['kind'], string | null> = {
  comment: null,
  return: 'returned the study',
  sign: 'signed the study',
};

/** The study's thread, oldest first, with a box to add to it. */
export function CommentThread({
  studyId,
  canComment,
}: {
  studyId: number;
  canComment: boolean;
}) {
  const comments = useComments(studyId);
  const add = useAddComment(studyId);
  const [body, setBody] = useState('');
  const fieldError =
    add.error instanceof ApiError ? add.error.fieldMessage('body') : undefined;

  const handleSubmit = (event: FormEvent) => {
    event.preventDefault();
    add.mutate(body, { onSuccess: () => setBody('') });
  };

  return (
    <div className="space-y-4">
      {comments.isPending && <Loading what="the comments" />}
      {comments.isError && (
        <ErrorNotice
          error={comments.error}
          onRetry={() => void comments.refetch()}
        />
      )}
      {comments.data && comments.data.length === 0 && (
        <Empty>No comments yet.</Empty>
      )}
      {comments.data && comments.data.length > 0 && (
        <ol className="space-y-3" aria-label="Comments">
          {comments.data.map((c) => (
            <li
              key={c.id}
              data-testid={`comment-${c.id}`}
              className={`rounded-lg p-3 text-sm ${c.kind === 'return' ? 'bg-caution-50 ring-1 ring-caution-500/40' : 'bg-slate-50'}`}
            >
              <p className="text-xs text-slate-500">
                <span className="font-semibold text-slate-800">
                  {c.author.displayName}
                </span>{' '}
                ({c.author.role})
                {KIND_LABELS[c.kind] && ` ${KIND_LABELS[c.kind]}`} · revision{' '}
                {c.revision} · {formatDateTime(c.createdAt)}
              </p>
              <p className="mt-1 whitespace-pre-wrap text-slate-900">
                {c.body}
              </p>
            </li>
          ))}
        </ol>
      )}
      {canComment && (
        <form onSubmit={handleSubmit} className="space-y-2" data-print="hide">
          <TextAreaField
            label="Add a comment"
            rows={2}
            value={body}
            onChange={(e) => setBody(e.target.value)}
            error={fieldError}
          />
          {add.isError && !fieldError && <ErrorNotice error={add.error} />}
          <Button type="submit" variant="secondary" disabled={add.isPending}>
            Post comment
          </Button>
        </form>
      )}
    </div>
  );
}
