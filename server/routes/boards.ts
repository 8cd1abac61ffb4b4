import type { AppDeps } from '../deps.js';
import { ACCESS } from '../schemas/access.js';
import { idParam, type RouteSpec } from '../lib/http.js';
import { createBoardSchema, panelSchema, reorderSchema, updateBoardSchema, updatePanelSchema } from '../schemas/boards.js';
import * as boards from '../services/boards.js';

export function boardRoutes({ db, pool }: AppDeps): RouteSpec[] {
  const ids = (p: Record<string, string>) => [idParam(p.id, 'The board'), idParam(p.panelId, 'The panel')] as const;
  return [
    { method: 'get', path: '/boards', access: 'signedIn', summary: 'Boards shared with the team, and one’s own', tags: ['boards'], handler: async ({ auth }) => ({ items: await boards.listBoards(db, auth!.user) }) },
    { method: 'post', path: '/boards', access: ACCESS.boardsWrite, summary: 'Compose a board', tags: ['boards'], body: createBoardSchema, status: 201, handler: ({ body, auth }) => boards.createBoard(db, auth!.user, body) },
    { method: 'get', path: '/boards/:id', access: 'signedIn', summary: 'A board with its panels', tags: ['boards'], handler: ({ params, auth }) => boards.getBoard(db, auth!.user, idParam(params.id, 'The board')) },
    { method: 'patch', path: '/boards/:id', access: ACCESS.boardsWrite, summary: 'Change one’s own board', tags: ['boards'], body: updateBoardSchema, handler: ({ params, body, auth }) => boards.updateBoard(db, auth!.user, idParam(params.id, 'The board'), body) },
    { method: 'delete', path: '/boards/:id', access: ACCESS.boardsWrite, summary: 'Delete one’s own board', tags: ['boards'], handler: ({ params, auth }) => boards.deleteBoard(db, auth!.user, idParam(params.id, 'The board')) },
    { method: 'post', path: '/boards/:id/panels', access: ACCESS.boardsWrite, summary: 'Add a panel', tags: ['boards'], body: panelSchema, status: 201, handler: ({ params, body, auth }) => boards.addPanel(db, auth!.user, idParam(params.id, 'The board'), body) },
    { method: 'put', path: '/boards/:id/panels/order', access: ACCESS.boardsWrite, summary: 'Reorder the panels', tags: ['boards'], body: reorderSchema, handler: ({ params, body, auth }) => boards.reorderPanels(db, auth!.user, idParam(params.id, 'The board'), body.panelIds) },
    {
      method: 'patch',
      path: '/boards/:id/panels/:panelId',
      access: ACCESS.boardsWrite,
      summary: 'Change a panel (title, notes, size, studies)',
      tags: ['boards'],
      body: updatePanelSchema,
      handler: ({ params, body, auth }) => boards.updatePanel(db, auth!.user, ...ids(params), body as never),
    },
    { method: 'delete', path: '/boards/:id/panels/:panelId', access: ACCESS.boardsWrite, summary: 'Remove a panel', tags: ['boards'], handler: ({ params, auth }) => boards.deletePanel(db, auth!.user, ...ids(params)) },
    {
      method: 'get',
      path: '/boards/:id/panels/:panelId/data',
      access: 'signedIn',
      summary: 'What a panel shows, computed from the current data, with the vintages it uses',
      tags: ['boards'],
      handler: async ({ params, auth }) => boards.panelData(db, await boards.getPanel(db, auth!.user, ...ids(params)), pool),
    },
  ];
}
