import { useNavigate, useParams } from 'react-router-dom';
import {
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import {
  useStudy,
  useStudyOptions,
  useUpdateStudy,
} from '../../features/studies/api/studies.ts';
import { planFormFrom } from '../../features/studies/components/plan-form-state.ts';
import { StudyPlanForm } from '../../features/studies/components/study-plan-form.tsx';
import { ApiError } from '../../lib/api-client.ts';

export default function StudyEditPage() {
  const id = Number(useParams().id);
  const study = useStudy(id);
  const options = useStudyOptions();
  const update = useUpdateStudy(id);
  const navigate = useNavigate();

  if (study.isPending || options.isPending)
    return <Loading what="the study plan" />;
  if (study.isError)
    return (
      <ErrorNotice error={study.error} onRetry={() => void study.refetch()} />
    );
  if (options.isError)
    return (
      <ErrorNotice
        error={options.error}
        onRetry={() => void options.refetch()}
      />
    );
  if (!study.data.permissions.edit) {
    return (
      <ErrorNotice
        error={
          new ApiError(
            409,
            'study_locked',
            'This study cannot be changed now: it is under review or signed, or it is not yours.',
          )
        }
      />
    );
  }
  return (
    <div className="space-y-6">
      <PageTitle>Change the plan of “{study.data.title}”</PageTitle>
      <p className="text-sm text-slate-600">
        Conditions that stay the same keep their paired images; a condition you
        remove loses its pairing.
      </p>
      <StudyPlanForm
        initial={planFormFrom(study.data)}
        options={options.data}
        submitLabel="Save the plan"
        isPending={update.isPending}
        serverError={update.error}
        onSubmit={(input) =>
          update.mutate(input, {
            onSuccess: () => void navigate(`/studies/${id}`),
          })
        }
      />
    </div>
  );
}
