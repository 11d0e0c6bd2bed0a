import type {
  Arm,
  FilterLayer,
  PhantomMaterial,
} from '../schemas/study.schema.ts';
import { describeFiltration } from './expected-acquisitions.ts';

/** Display names of phantom materials. */
export const PHANTOM_MATERIAL_NAMES: Record<PhantomMaterial, string> = {
  pmma: 'PMMA',
  water: 'water',
  aluminium: 'aluminium',
};

/** Display names of the two arms of a condition. */
export const ARM_NAMES: Record<Arm, string> = {
  grid: 'with grid',
  no_grid: 'without grid',
};

/**
 * A condition in words, e.g. "70 kV (0.1 mm Cu) · 20 cm PMMA · G12".
 * @param condition kV, filtration and phantom thickness in cm.
 * @param gridLabel the grid under test's label.
 */
export function describeCondition(
  condition: {
    kvp: number;
    addedFiltration: FilterLayer[];
    phantomThicknessCm: number;
  },
  phantomMaterial: PhantomMaterial,
  gridLabel: string,
): string {
  return `${condition.kvp} kV (${describeFiltration(condition.addedFiltration)}) · ${condition.phantomThicknessCm} cm ${PHANTOM_MATERIAL_NAMES[phantomMaterial]} · ${gridLabel}`;
}
