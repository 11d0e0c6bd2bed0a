import type { ListStudiesQuery } from '../../../../shared/schemas/study.schema.ts';

/**
 * Query keys of studies. Everything about one study sits under
 * `['studies', id]`, so a change to it refreshes the lot.
 */
export const studyKeys = {
  all: ['studies'] as const,
  list: (filters: ListStudiesQuery) =>
    [...studyKeys.all, 'list', filters] as const,
  options: () => [...studyKeys.all, 'options'] as const,
  study: (id: number) => [...studyKeys.all, id] as const,
  checklist: (id: number) => [...studyKeys.study(id), 'checklist'] as const,
  assignments: (id: number) => [...studyKeys.study(id), 'assignments'] as const,
};
