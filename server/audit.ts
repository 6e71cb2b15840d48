import type { Knex } from "knex";
import type { SessionUser } from "./http.ts";

export interface AuditEntry {
  actor?: Pick<SessionUser, "id" | "email"> | null;
  actorLabel?: string;
  action: string;
  subjectType?: string;
  subjectId?: string | number;
  details?: Record<string, unknown>;
  ip?: string;
}

/** Append one line to the audit trail. Pass a transaction to record it with the change it describes. */
export async function audit(db: Knex | Knex.Transaction, e: AuditEntry): Promise<void> {
  await db("audit_log").insert({
    actor_user_id: e.actor?.id ?? null,
    actor_label: e.actorLabel ?? e.actor?.email ?? null,
    action: e.action,
    subject_type: e.subjectType ?? null,
    subject_id: e.subjectId === undefined ? null : String(e.subjectId),
    details: e.details ? JSON.stringify(e.details) : null,
    ip: e.ip ?? null,
  });
}
