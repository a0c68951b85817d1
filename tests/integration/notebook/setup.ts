/** A workspace with one member of each role and a notebook, for the notebook's integration tests. */
import { memberships } from '../../../server/db/schema';
import { startApiServer, type TestServer } from '../../helpers/server';
import { TestClient, createWorkspace, signUp } from '../../helpers/http';

export interface NotebookWorld {
  server: TestServer;
  owner: TestClient;
  editor: TestClient;
  reviewer: TestClient;
  viewer: TestClient;
  outsider: TestClient;
  ws: string;
  nb: string;
  base: string;
  ids: Record<'owner' | 'editor' | 'reviewer' | 'viewer', string>;
}

export async function notebookWorld(server?: TestServer): Promise<NotebookWorld> {
  server ??= await startApiServer();
  const clients = { owner: server.client(), editor: server.client(), reviewer: server.client(), viewer: server.client(), outsider: server.client() };
  const ids = {} as NotebookWorld['ids'];
  for (const [k, c] of Object.entries(clients)) {
    const u = await signUp(c, { name: k[0].toUpperCase() + k.slice(1) });
    if (k !== 'outsider') ids[k as keyof NotebookWorld['ids']] = u.id;
  }
  const ws = await createWorkspace(clients.owner, 'Coffee blend trial');
  await server.db.db.insert(memberships).values(
    (['editor', 'reviewer', 'viewer'] as const).map((role) => ({ workspaceId: ws, userId: ids[role], role, createdAt: server!.clock.now() })),
  );
  const res = await clients.owner.post(`/api/workspaces/${ws}/notebooks`, { title: 'Blend proportions' });
  if (res.status !== 201) throw new Error(`create notebook: ${res.status} ${res.text}`);
  const nb = res.body.notebook.id as string;
  return { server, ...clients, ws, nb, base: `/api/workspaces/${ws}/notebooks/${nb}`, ids };
}

/** POST a file as multipart through a test client (keeps its cookies and origin). */
export function postFile(client: TestClient, path: string, file: { name: string; text: string | Uint8Array; type?: string }, fields: Record<string, string> = {}) {
  const form = new FormData();
  for (const [k, v] of Object.entries(fields)) form.set(k, v);
  form.set('file', new Blob([file.text as BlobPart], { type: file.type ?? 'text/csv' }), file.name);
  return client.raw(path, { method: 'POST', body: form });
}
