import { describe, expect, it } from 'vitest';
import { DomainError } from '../../../shared/errors.ts';
import type { StudyStatus } from '../../../shared/schemas/study.schema.ts';
import {
  actionsFrom,
  assertOpenForChanges,
  isOpenForChanges,
  nextStatus,
  type StudyAction,
} from '../../../shared/studies/study-state.ts';

describe('nextStatus', () => {
  it.each<[StudyStatus, StudyAction, StudyStatus]>([
    ['draft', 'submit', 'submitted'],
    ['returned', 'submit', 'submitted'],
    ['submitted', 'return', 'returned'],
    ['submitted', 'sign', 'signed'],
    ['signed', 'revise', 'draft'],
  ])('moves a %s study to %s → %s', (from, action, to) => {
    expect(nextStatus(from, action)).toBe(to);
  });

  it.each<[StudyStatus, StudyAction]>([
    ['draft', 'sign'],
    ['draft', 'return'],
    ['draft', 'revise'],
    ['returned', 'sign'],
    ['returned', 'return'],
    ['submitted', 'submit'],
    ['submitted', 'revise'],
    ['signed', 'submit'],
    ['signed', 'sign'],
    ['signed', 'return'],
  ])('refuses to %s → %s with invalid_state_transition', (from, action) => {
    expect(() => nextStatus(from, action)).toThrow(DomainError);
    try {
      nextStatus(from, action);
    } catch (error) {
      expect((error as DomainError).code).toBe('invalid_state_transition');
    }
  });

  it('says in words why signing a draft is refused', () => {
    expect(() => nextStatus('draft', 'sign')).toThrow(
      'A study that is a draft cannot be signed.',
    );
  });
});

describe('actionsFrom', () => {
  it('lists what each state allows', () => {
    expect(actionsFrom('draft')).toEqual(['submit']);
    expect(actionsFrom('returned')).toEqual(['submit']);
    expect(actionsFrom('submitted')).toEqual(['return', 'sign']);
    expect(actionsFrom('signed')).toEqual(['revise']);
  });
});

describe('open for changes', () => {
  it('is open only while draft or returned', () => {
    expect(isOpenForChanges('draft')).toBe(true);
    expect(isOpenForChanges('returned')).toBe(true);
    expect(isOpenForChanges('submitted')).toBe(false);
    expect(isOpenForChanges('signed')).toBe(false);
  });

  it('refuses changes to a signed study with study_locked and says how to go on', () => {
    expect(() => assertOpenForChanges('draft')).not.toThrow();
    let caught: unknown;
    try {
      assertOpenForChanges('signed');
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(DomainError);
    expect((caught as DomainError).code).toBe('study_locked');
    expect((caught as DomainError).message).toMatch(/new revision/);
  });

  it('refuses changes while waiting for review', () => {
    expect(() => assertOpenForChanges('submitted')).toThrow(
      /waiting for review/,
    );
  });
});
