import type { Actor } from '../../shared/permissions.ts';

/**
 * Who may use the library of region layouts. Layouts are a tool for
 * preparing studies: physicists and residents read and save them, admins
 * read them; committee members see the layouts of signed studies through
 * those studies only. A resident changes the library layouts they saved; a
 * physicist changes any.
 */

/** The facts of a library layout the rules need. */
export interface LayoutFacts {
  ownerId: number;
}

/** May the actor read the layout library? */
export const canReadLayoutLibrary = (actor: Actor): boolean =>
  actor.role !== 'committee';

/** May the actor save a new layout to the library? */
export const canSaveLayout = (actor: Actor): boolean =>
  actor.role === 'physicist' || actor.role === 'resident';

/** May the actor change or delete this library layout? */
export const canEditLayout = (actor: Actor, layout: LayoutFacts): boolean =>
  actor.role === 'physicist' ||
  (actor.role === 'resident' && layout.ownerId === actor.id);
