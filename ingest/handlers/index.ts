/**
 * Post-commit handlers of the ingest worker. After each committed batch the worker calls
 * every handler's `onReadings` with the rows actually inserted (duplicates excluded),
 * `onTick` about once a second, and `onConfigChange` once a committed configuration change
 * has reached the worker. A handler's error is logged and never stops ingest.
 * Handlers live in `ingest/handlers/<name>.ts` and import their contract from `./types.ts`;
 * add one line per handler below.
 */
import { retentionHandler } from './retention.ts';
import { alarmsHandler } from './alarms/index.ts';
import { ovenLoadsHandler } from './oven-loads.ts';
import { spcHandler } from './spc.ts';
import type { PostCommitHandler } from './types.ts';

export type { ConfigChange, ConfigTable, PostCommitHandler, StoredReading, WorkerContext } from './types.ts';

export const postCommitHandlers: PostCommitHandler[] = [
  // one line per handler
  retentionHandler,
  alarmsHandler,
  ovenLoadsHandler,
  spcHandler,
];
