import { Link, useParams } from 'react-router-dom';
import { Button } from '../../components/ui/button.tsx';
import { ErrorNotice, Loading } from '../../components/ui/page-state.tsx';
import { useChecklist } from '../../features/studies/api/studies.ts';
import { ChecklistSheet } from '../../features/studies/components/checklist-sheet.tsx';

export default function StudyChecklistPage() {
  const id = Number(useParams().id);
  const checklist = useChecklist(id);
  return (
    <div className="space-y-4">
      <div className="flex gap-3" data-print="hide">
        <Button onClick={() => window.print()}>Print the checklist</Button>
        <Link
          to={`/studies/${id}`}
          className="self-center text-sm text-lamina-700 underline"
        >
          Back to the study
        </Link>
      </div>
      {checklist.isPending && <Loading what="the checklist" />}
      {checklist.isError && (
        <ErrorNotice
          error={checklist.error}
          onRetry={() => void checklist.refetch()}
        />
      )}
      {checklist.data && <ChecklistSheet checklist={checklist.data} />}
    </div>
  );
}
