/**
 * Who may do what: one role map read by the server's route guard (server/lib/http.ts), the
 * client's router (RequireRole) and its navigation. A page lists the API routes it reads, and the
 * role-matrix test checks that the server lets everyone who may open a page call them.
 */
import type { Role } from './people.js';

/** `public`: anyone; `signedIn`: any person signed in; a list: people with at least one of the roles. */
export type Access = 'public' | 'signedIn' | readonly Role[];

export const ACCESS = {
  /** Defining series and loading releases. */
  catalogueWrite: ['steward', 'admin'],
  /** Reading studies, their results, comparisons, real-time analyses and exports. */
  studiesRead: ['economist', 'editor', 'admin'],
  /** Saving, changing (one's own) and duplicating studies. */
  studiesWrite: ['economist'],
  /** Analyses across methods: the range of estimates and the real-time reliability table. */
  analyses: ['economist'],
  /** Composing boards and their panels. */
  boardsWrite: ['economist'],
  /** Drafting exhibits (the moves of review are checked per person by the state machine). */
  exhibitsDraft: ['economist'],
  /** The Review desk. */
  review: ['editor'],
  /** An exhibit's review record (revisions compared); per person: its author, editors and administrators (services/exhibits/views.ts). */
  reviewRecord: ['economist', 'editor', 'admin'],
  /** Keeping the reference chronology (dated peaks and troughs). */
  chronologyWrite: ['admin', 'editor'],
  /** People, invitations, the audit log, settings, the Mailbox. */
  people: ['admin'],
} as const satisfies Record<string, readonly Role[]>;

/** Whether a person with `roles` (null: nobody signed in) passes `access`. */
export function allows(access: Access, roles: readonly Role[] | null | undefined): boolean {
  if (access === 'public') return true;
  if (!roles) return false;
  if (access === 'signedIn') return true;
  return access.some((r) => roles.includes(r));
}

export interface Page {
  /** The client's path (React Router pattern). */
  path: string;
  access: Access;
  /** The API routes the page reads or writes ("METHOD /api/v1/…" as registered); the first is its main one. */
  api: readonly string[];
  /** Its label in the main navigation, when it has an entry there. */
  nav?: string;
}

/** The client's pages behind sign-in, in navigation order where they have an entry. */
export const PAGES = [
  { path: '/', access: 'signedIn', api: [] },
  { path: '/catalogue', access: 'signedIn', api: ['GET /api/v1/series', 'GET /api/v1/catalogue/units'], nav: 'Catalogue' },
  { path: '/catalogue/new', access: ACCESS.catalogueWrite, api: ['POST /api/v1/series'] },
  { path: '/catalogue/loads', access: ACCESS.catalogueWrite, api: ['POST /api/v1/loads', 'GET /api/v1/loads'] },
  { path: '/catalogue/feeds', access: ACCESS.catalogueWrite, api: ['GET /api/v1/feeds', 'POST /api/v1/feeds', 'PATCH /api/v1/feeds/:id', 'DELETE /api/v1/feeds/:id', 'POST /api/v1/feeds/:id/run', 'GET /api/v1/feeds/:id/runs', 'GET /api/v1/series'] },
  { path: '/catalogue/:id', access: 'signedIn', api: ['GET /api/v1/series/:id', 'GET /api/v1/series/:id/vintages', 'GET /api/v1/series/:id/vintages/:number/observations', 'GET /api/v1/series/:id/revisions', 'GET /api/v1/series/:id/revisions/triangle', 'GET /api/v1/series/:series/history'] },
  { path: '/catalogue/:id/edit', access: ACCESS.catalogueWrite, api: ['PATCH /api/v1/series/:id', 'GET /api/v1/series/:id'] },
  { path: '/studies', access: ACCESS.studiesRead, api: ['GET /api/v1/studies', 'GET /api/v1/methods'], nav: 'Studies' },
  { path: '/studies/new', access: ACCESS.studiesWrite, api: ['POST /api/v1/studies', 'POST /api/v1/studies/preview', 'POST /api/v1/studies/compare', 'GET /api/v1/methods', 'GET /api/v1/series', 'GET /api/v1/chronologies'] },
  {
    path: '/studies/:id',
    access: ACCESS.studiesRead,
    api: ['GET /api/v1/studies/:id', 'POST /api/v1/studies/preview', 'POST /api/v1/studies/compare', 'POST /api/v1/studies/:id/realtime', 'GET /api/v1/studies/:id/export', 'GET /api/v1/studies/:id/script', 'GET /api/v1/methods', 'GET /api/v1/series', 'GET /api/v1/chronologies'],
  },
  { path: '/analyses', access: ACCESS.analyses, api: ['POST /api/v1/studies/range', 'POST /api/v1/series/:series/reliability', 'GET /api/v1/series', 'GET /api/v1/methods'], nav: 'Range & reliability' },
  { path: '/boards', access: 'signedIn', api: ['GET /api/v1/boards'], nav: 'Boards' },
  { path: '/boards/:id', access: 'signedIn', api: ['GET /api/v1/boards/:id', 'GET /api/v1/boards/:id/panels/:panelId/data', 'GET /api/v1/boards/:id/pack.pdf', 'GET /api/v1/boards/:id/pack.zip'] },
  { path: '/exhibits', access: 'signedIn', api: ['GET /api/v1/exhibits', 'POST /api/v1/exhibits/pack'], nav: 'Exhibits' },
  { path: '/exhibits/new', access: ACCESS.exhibitsDraft, api: ['POST /api/v1/exhibits'] },
  { path: '/exhibits/:id', access: 'signedIn', api: ['GET /api/v1/exhibits/:id', 'GET /api/v1/exhibits/:id/data', 'GET /api/v1/exhibits/:id/pdf', 'POST /api/v1/exhibits/:id/transitions', 'GET /api/v1/chronologies'] },
  { path: '/chronology', access: 'signedIn', api: ['GET /api/v1/chronologies', 'GET /api/v1/chronologies/:id', 'GET /api/v1/series'], nav: 'Chronology' },
  { path: '/review', access: ACCESS.review, api: ['GET /api/v1/review'], nav: 'Review desk' },
  { path: '/people', access: ACCESS.people, api: ['GET /api/v1/users', 'GET /api/v1/invitations', 'GET /api/v1/audit', 'GET /api/v1/settings'], nav: 'People' },
  { path: '/people/mailbox', access: ACCESS.people, api: ['GET /api/v1/dev/mailbox'] },
  { path: '/profile', access: 'signedIn', api: ['GET /api/v1/tokens', 'POST /api/v1/tokens', 'POST /api/v1/auth/password', 'GET /api/v1/profile/alerts', 'PUT /api/v1/profile/alerts'] },
] as const satisfies readonly Page[];

export type PagePath = (typeof PAGES)[number]['path'];

/** The page a path pattern names. */
export function page(path: PagePath): Page {
  return PAGES.find((p) => p.path === path)!;
}
