import type { Transaction } from 'sequelize';
import { AuditEvent } from '../models/audit-event.model.ts';

/** Who did it and from where, taken from the request. */
export interface AuditContext {
  actorId: number | null;
  ipAddress: string | null;
}

/**
 * Appends one event to the audit trail, inside the caller's transaction when
 * given so the event and the change it records commit together.
 */
export async function recordAudit(
  context: AuditContext,
  event: {
    action: string;
    targetType: string;
    targetId?: string | number | null;
    details?: Record<string, unknown>;
  },
  transaction?: Transaction,
): Promise<void> {
  await AuditEvent.create(
    {
      actorId: context.actorId,
      action: event.action,
      targetType: event.targetType,
      targetId:
        event.targetId === undefined || event.targetId === null
          ? null
          : String(event.targetId),
      details: event.details ?? {},
      ipAddress: context.ipAddress,
    },
    { transaction },
  );
}

/** The audit entries about one thing, newest first. */
export async function listAuditFor(
  targetType: string,
  targetId: string | number,
): Promise<AuditEvent[]> {
  return AuditEvent.findAll({
    where: { targetType, targetId: String(targetId) },
    order: [['id', 'DESC']],
    limit: 500,
  });
}
