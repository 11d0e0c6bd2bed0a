/** Query keys of the geometry feature. */
export const geometryKeys = {
  all: ['geometry'] as const,
  registerGrids: () => [...geometryKeys.all, 'register-grids'] as const,
  studyPredictions: (studyId: number, scatterToPrimaryRatio: number) =>
    [
      ...geometryKeys.all,
      'study-predictions',
      studyId,
      scatterToPrimaryRatio,
    ] as const,
};
