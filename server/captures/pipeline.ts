import type { AppContext } from "../context.ts";
import { createBlobStore } from "../blob/index.ts";
import { createCaptureQueue, type QueueOptions } from "../queue.ts";

/**
 * Register the capture pipeline's services on the context: `services.blob` (blob store) and `services.queue`
 * (pg-boss), and stop the queue on close. The server only sends jobs; workers/worker.ts runs them.
 */
export async function installPipeline(ctx: AppContext, opts: QueueOptions = {}): Promise<void> {
  if (!ctx.services.blob) ctx.services.blob = await createBlobStore(ctx.config);
  if (!ctx.services.queue) {
    const queue = await createCaptureQueue(ctx.config.databaseUrl, { max: 3, ...opts });
    ctx.services.queue = queue;
    const closers = (ctx.services.onClose as (() => Promise<void>)[] | undefined) ?? [];
    ctx.services.onClose = closers;
    closers.push(() => queue.stop());
  }
}
