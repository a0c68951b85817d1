/** Export a notebook as our own JSON file, and import such a file as a new notebook. */
import { Router } from 'express';
import { and, eq, inArray } from 'drizzle-orm';
import { routes } from '../../shared/api/routes';
import { NOTEBOOK_FILE_MAX_BYTES, datasetIdOf } from '../../shared/api/notebook';
import { buildNotebookFile, readNotebookFile, remapContent } from '../../shared/notebook-file';
import type { AppContext } from '../context';
import { cells, datasets, notebooks } from '../db/schema';
import { mount } from '../http/route';
import { mountUpload } from '../http/upload';
import { badRequest } from '../http/errors';
import { DomainError } from '../lib/errors';
import { newId } from '../lib/ids';
import { orderedCells } from '../notebook/cells';
import { parseUpload } from '../notebook/datasets';
import { findNotebook } from './notebooks';

export function notebookFileRouter(ctx: AppContext): Router {
  const r = Router();
  const { db, clock } = ctx;

  mount(r, ctx, routes.exportNotebook, async ({ params }, req, res) => {
    const ws = req.workspace!;
    const nb = await findNotebook(db, ws.id, params.notebookId);
    const list = await orderedCells(db, ws.id, nb.id);
    const ids = [
      ...new Set(
        list
          .filter((c) => c.kind === 'data')
          .map((c) => datasetIdOf(c.content))
          .filter((x): x is string => typeof x === 'string'),
      ),
    ];
    const rows = ids.length ? await db.select().from(datasets).where(and(eq(datasets.workspaceId, ws.id), inArray(datasets.id, ids))) : [];
    const file = buildNotebookFile(
      nb.title,
      list.map((c) => ({ id: c.id, kind: c.kind, source: c.source, content: c.content, collapsed: c.collapsed })),
      rows.map((d) => ({ id: d.id, name: d.name, csv: d.content.toString('utf8') })),
      clock.now(),
    );
    const fileName = `${nb.title.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '') || 'notebook'}.slackline.json`;
    res.setHeader('Content-Disposition', `attachment; filename="${fileName}"`);
    res.status(200).json(file);
  });

  mountUpload(r, ctx, routes.importNotebook, { field: 'file', maxBytes: NOTEBOOK_FILE_MAX_BYTES, what: 'notebook file' }, async ({ file }, req, res) => {
    const ws = req.workspace!;
    let json: unknown;
    try {
      json = JSON.parse(file.bytes.toString('utf8'));
    } catch {
      throw badRequest('Not a Slackline notebook file: the file is not valid JSON', { file: 'Not valid JSON' });
    }
    // Version 2 (written by export) or version 1; one sentence naming the first problem otherwise.
    const read = readNotebookFile(json);
    if (!read.ok) throw badRequest(read.message, { file: read.message });
    const nf = read.file;
    // Parse every dataset before writing anything: a bad table refuses the whole file.
    const tables = await Promise.all(
      nf.datasets.map(async (d) => {
        try {
          return { d, ...(await parseUpload(Buffer.from(d.csv, 'utf8'))) };
        } catch (e) {
          if (!(e instanceof DomainError && e.kind === 'invalid')) throw e;
          throw badRequest(`Dataset "${d.name}" in the file: ${(e as Error).message}`);
        }
      }),
    );
    const now = clock.now();
    const notebookId = newId();
    const cellIds = new Map(nf.cells.map((c) => [c.key, newId()]));
    const dataIds = new Map(nf.datasets.map((d) => [d.key, newId()]));
    await db.transaction(async (tx) => {
      await tx.insert(notebooks).values({ id: notebookId, workspaceId: ws.id, title: nf.title, createdBy: req.user!.id, createdAt: now, updatedAt: now });
      for (const t of tables) {
        const bytes = Buffer.from(t.d.csv, 'utf8');
        await tx.insert(datasets).values({
          id: dataIds.get(t.d.key)!, workspaceId: ws.id, notebookId, cellId: null, name: t.d.name, columns: t.columns,
          rowCount: t.rows, bytes: bytes.length, content: bytes, tableColumns: t.stored, createdBy: req.user!.id, createdAt: now,
        });
      }
      let position = 0;
      for (const c of nf.cells) {
        await tx.insert(cells).values({
          id: cellIds.get(c.key)!, workspaceId: ws.id, notebookId, kind: c.kind, position: position++, source: c.source,
          content: remapContent(c.kind, c.content, (k) => cellIds.get(k), (k) => dataIds.get(k)),
          version: 1, collapsed: c.collapsed, createdBy: req.user!.id, updatedBy: req.user!.id, createdAt: now, updatedAt: now,
        });
      }
    });
    res.status(201);
    return { notebook: { id: notebookId, title: nf.title }, cells: nf.cells.length, datasets: nf.datasets.length };
  });

  return r;
}
