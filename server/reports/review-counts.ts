import type { Knex } from "knex";

// The review queue's waiting clock. The queue groups findings by capture (`findings as f`, server/routes/findings.ts);
// with status=all a group also holds findings that already have a verdict, and those no longer wait. So the clock runs
// from the newest finding still without one (status "open": a verdict moves the status to confirmed, dismissed or
// remeasure) and is null once every finding of the capture has its verdict; sorts put those last (nulls last).

/** Select column `raised_at` of a review group: when its newest finding still waiting for a verdict was raised, or null. */
export const waitingSinceColumn = (db: Knex) => db.raw("max(f.created_at) filter (where f.status = 'open') as raised_at");
