import type { FigureKey } from '../figures.ts';
import { figureDefinition } from '../figures.ts';

/**
 * Measured grid figures beside the maker's stated IEC 60627 figures. IEC
 * 60627 says its test conditions are laboratory conditions not usually
 * available at the user's site and that it is not an acceptance-test method,
 * so a phantom measurement in a clinical room gives field values, labelled
 * so, and never a pass or fail against the stated values.
 * @see PHYSICS.md §2; IEC 60627:2013.
 */

export const FIELD_VALUE_LABEL = 'field value';
export const STATED_VALUE_LABEL = 'stated value (IEC 60627)';
export const PREDICTED_VALUE_LABEL = 'predicted from construction';

/** The note printed wherever field and stated values stand side by side. */
export const FIELD_VS_STATED_NOTE =
  "IEC 60627 says its test conditions are laboratory conditions not usually available at the user's site and that it is not an acceptance-test method. Figures measured here with a phantom in a clinical room are field values; they differ from the maker's stated IEC 60627 values because beam, phantom, field size and scatter differ, and are shown beside them for reference, not as a pass or fail.";

/** The stated figures a grid record may carry (null when not given). */
export interface StatedGridFigures {
  statedTp: number | null;
  statedTs: number | null;
  statedContrastImprovementFactor: number | null;
  statedBuckyFactor: number | null;
  statedSelectivity: number | null;
}

/** Which measured figure each stated figure is compared with. */
export const STATED_FIGURE_PAIRS: ReadonlyArray<{
  figure: FigureKey;
  stated: keyof StatedGridFigures;
}> = [
  { figure: 'primary_transmission', stated: 'statedTp' },
  { figure: 'scatter_transmission', stated: 'statedTs' },
  {
    figure: 'contrast_improvement_factor',
    stated: 'statedContrastImprovementFactor',
  },
  { figure: 'bucky_factor', stated: 'statedBuckyFactor' },
  { figure: 'selectivity', stated: 'statedSelectivity' },
];

/** A field value over a selection of conditions. */
export interface FieldValue {
  value: number;
  ciLow: number;
  ciHigh: number;
  /** Conditions behind the value. */
  n: number;
}

/** One figure: field value beside stated value. */
export interface FieldVsStatedRow {
  figure: FigureKey;
  label: string;
  symbol: string;
  field: FieldValue | null;
  fieldLabel: typeof FIELD_VALUE_LABEL;
  statedValue: number;
  statedLabel: typeof STATED_VALUE_LABEL;
  /** (field − stated)/stated in %, null without a field value. */
  differencePercent: number | null;
}

/**
 * Rows for every figure the grid's maker stated, with the field value over
 * the selection when one was measured.
 * @param stated the grid's stated figures.
 * @param field field values by figure.
 * @returns rows in the order of {@link STATED_FIGURE_PAIRS}; none when the
 *   grid has no stated figures.
 */
export function fieldVersusStated(
  stated: StatedGridFigures,
  field: Partial<Record<FigureKey, FieldValue>>,
): FieldVsStatedRow[] {
  return STATED_FIGURE_PAIRS.flatMap(({ figure, stated: key }) => {
    const statedValue = stated[key];
    if (statedValue === null || !Number.isFinite(statedValue)) return [];
    const definition = figureDefinition(figure);
    const measured = field[figure] ?? null;
    return [
      {
        figure,
        label: definition.label,
        symbol: definition.symbol,
        field: measured,
        fieldLabel: FIELD_VALUE_LABEL,
        statedValue,
        statedLabel: STATED_VALUE_LABEL,
        differencePercent:
          measured && statedValue !== 0
            ? ((measured.value - statedValue) / statedValue) * 100
            : null,
      },
    ];
  });
}
