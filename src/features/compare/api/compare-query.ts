import type { CompareQueryInput } from '../../../../shared/schemas/compare.schema.ts';

/** Board filters as the page keeps them (strings, as in the address bar). */
export interface BoardFilters {
  rooms: string[];
  grids: string[];
  detectors: string[];
  kvMin: string;
  kvMax: string;
  thicknessMin: string;
  thicknessMax: string;
  from: string;
  to: string;
  drafts: boolean;
}

export const EMPTY_FILTERS: BoardFilters = {
  rooms: [],
  grids: [],
  detectors: [],
  kvMin: '',
  kvMax: '',
  thicknessMin: '',
  thicknessMax: '',
  from: '',
  to: '',
  drafts: false,
};

const LISTS = ['rooms', 'grids', 'detectors'] as const;
const VALUES = [
  'kvMin',
  'kvMax',
  'thicknessMin',
  'thicknessMax',
  'from',
  'to',
] as const;

/** Filters read from the address bar's search params. */
export function filtersFromSearch(search: URLSearchParams): BoardFilters {
  const filters: BoardFilters = { ...EMPTY_FILTERS };
  for (const key of LISTS) {
    filters[key] = (search.get(key) ?? '').split(',').filter(Boolean);
  }
  for (const key of VALUES) filters[key] = search.get(key) ?? '';
  filters.drafts = search.get('drafts') === 'true';
  return filters;
}

/** The search params of the board's API calls and of the address bar. */
export function searchFromFilters(filters: BoardFilters): URLSearchParams {
  const search = new URLSearchParams();
  for (const key of LISTS) {
    if (filters[key].length > 0) search.set(key, filters[key].join(','));
  }
  for (const key of VALUES) {
    if (filters[key].trim() !== '') search.set(key, filters[key].trim());
  }
  if (filters.drafts) search.set('drafts', 'true');
  return search;
}

/** The query object the API parses, for typing the keys. */
export const queryInput = (filters: BoardFilters): CompareQueryInput =>
  Object.fromEntries(searchFromFilters(filters)) as CompareQueryInput;

const withSearch = (path: string, filters: BoardFilters) => {
  const text = searchFromFilters(filters).toString();
  return text ? `${path}?${text}` : path;
};

export const boardUrl = (filters: BoardFilters) =>
  withSearch('/api/compare', filters);
export const boardCsvUrl = (filters: BoardFilters) =>
  withSearch('/api/compare.csv', filters);
export const boardPdfUrl = (filters: BoardFilters) =>
  withSearch('/api/compare.pdf', filters);

/** Query keys of the compare feature. */
export const compareKeys = {
  all: ['compare'] as const,
  board: (filters: BoardFilters) =>
    ['compare', 'board', searchFromFilters(filters).toString()] as const,
  options: ['compare', 'options'] as const,
};
