/**
 * The product's shared vocabulary, defined once: the database enums (server/db/schema.ts), the API
 * schemas (shared/api) and the client all read these lists. Plain constants, no dependencies, so
 * the schema file and the migrations tool can import them too.
 */

/** Workspace roles, strongest first. */
export const ROLES = ['owner', 'editor', 'reviewer', 'viewer'] as const;

/** Kinds of notebook cells, in the order the "add a cell" menu offers them. */
export const CELL_KINDS = ['notes', 'data', 'model', 'fit', 'compare'] as const;

/** States of a fit run. */
export const RUN_STATUSES = ['queued', 'running', 'done', 'failed', 'cancelled'] as const;

/** Run states in which a run still holds a place in the queue (may change without the user). */
export const ACTIVE_RUN_STATUSES = ['queued', 'running'] as const satisfies readonly (typeof RUN_STATUSES)[number][];
