import { useNavigate } from 'react-router-dom';
import {
  ErrorNotice,
  Loading,
  PageTitle,
} from '../../components/ui/page-state.tsx';
import { SafetyNotice } from '../../components/ui/safety-notice.tsx';
import { useSession } from '../../features/auth/api/session.ts';
import {
  useCreateStudy,
  useStudyOptions,
} from '../../features/studies/api/studies.ts';
import { newPlanForm } from '../../features/studies/components/plan-form-state.ts';
import { StudyPlanForm } from '../../features/studies/components/study-plan-form.tsx';
import { ApiError } from '../../lib/api-client.ts';

export default function StudyNewPage() {
  const { data: session } = useSession();
  const options = useStudyOptions();
  const create = useCreateStudy();
  const navigate = useNavigate();
  if (!session) return null;
  if (!session.can.editStudies) {
    return (
      <ErrorNotice
        error={
          new ApiError(
            403,
            'forbidden',
            'Physicists and residents plan studies.',
          )
        }
      />
    );
  }
  return (
    <div className="space-y-6">
      <PageTitle>Plan a new study</PageTitle>
      {options.isPending && <Loading what="rooms, detectors and grids" />}
      {options.isError && (
        <ErrorNotice
          error={options.error}
          onRetry={() => void options.refetch()}
        />
      )}
      {options.data && options.data.rooms.length === 0 && (
        <ErrorNotice
          error={
            new ApiError(
              409,
              'conflict',
              'No room is registered yet: an administrator or physicist adds rooms and grids first.',
            )
          }
        />
      )}
      {options.data && options.data.rooms.length > 0 && (
        <StudyPlanForm
          initial={newPlanForm()}
          options={options.data}
          submitLabel="Create the study"
          isPending={create.isPending}
          serverError={create.error}
          onSubmit={(input) =>
            create.mutate(input, {
              onSuccess: (study) => void navigate(`/studies/${study.id}`),
            })
          }
        />
      )}
      <SafetyNotice />
    </div>
  );
}
