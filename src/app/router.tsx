/**
 * The client's routes. Pages behind sign-in come from the role map (server/schemas/access.ts):
 * each is wrapped in RequireRole with the same access the server checks for its API, and the
 * navigation lists those with a `nav` label.
 */
import { FeedsPage } from '@/features/feeds/FeedsPage';
import type { ReactNode } from 'react';
import { createBrowserRouter } from 'react-router-dom';
import { PAGES, type PagePath } from '@schemas/access';
import { AcceptInvitationPage } from '@/features/auth/AcceptInvitationPage';
import { ForgotPasswordPage, ResetPasswordPage } from '@/features/auth/PasswordPages';
import { SignInPage } from '@/features/auth/SignInPage';
import { BoardPage } from '@/features/boards/BoardPage';
import { AnalysesPage } from '@/features/analyses/AnalysesPage';
import { BoardsPage } from '@/features/boards/BoardsPage';
import { ChronologyPage } from '@/features/chronology/ChronologyPage';
import { CataloguePage } from '@/features/catalogue/CataloguePage';
import { LoadsPage } from '@/features/catalogue/LoadsPage';
import { EditSeriesPage, NewSeriesPage } from '@/features/catalogue/SeriesForm';
import { SeriesPage } from '@/features/catalogue/SeriesPage';
import { ExhibitPage } from '@/features/exhibits/ExhibitPage';
import { ExhibitsPage, ReviewDeskPage } from '@/features/exhibits/ExhibitsPage';
import { NewExhibitPage } from '@/features/exhibits/NewExhibitPage';
import { PublicExhibitPage } from '@/features/exhibits/PublicExhibitPage';
import { HomePage } from '@/features/home/HomePage';
import { MailboxPage } from '@/features/people/MailboxPage';
import { PeoplePage } from '@/features/people/PeoplePage';
import { ProfilePage } from '@/features/people/ProfilePage';
import { StudiesPage } from '@/features/studies/StudiesPage';
import { StudyPage } from '@/features/studies/StudyWorkspace';
import { Layout } from './Layout';
import { NotFoundPage } from './NotFoundPage';
import { RequireRole } from './RequireRole';

/** The component of every page of the role map (a page missing here does not compile). */
const ELEMENTS: Record<PagePath, ReactNode> = {
  '/': <HomePage />,
  '/catalogue': <CataloguePage />,
  '/catalogue/new': <NewSeriesPage />,
  '/catalogue/loads': <LoadsPage />,
  '/catalogue/feeds': <FeedsPage />,
  '/catalogue/:id': <SeriesPage />,
  '/catalogue/:id/edit': <EditSeriesPage />,
  '/studies': <StudiesPage />,
  '/studies/new': <StudyPage />,
  '/studies/:id': <StudyPage />,
  '/analyses': <AnalysesPage />,
  '/boards': <BoardsPage />,
  '/boards/:id': <BoardPage />,
  '/exhibits': <ExhibitsPage />,
  '/exhibits/new': <NewExhibitPage />,
  '/exhibits/:id': <ExhibitPage />,
  '/chronology': <ChronologyPage />,
  '/review': <ReviewDeskPage />,
  '/people': <PeoplePage />,
  '/people/mailbox': <MailboxPage />,
  '/profile': <ProfilePage />,
};

export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInPage /> },
  { path: '/forgot-password', element: <ForgotPasswordPage /> },
  { path: '/reset-password/:token', element: <ResetPasswordPage /> },
  { path: '/invite/:token', element: <AcceptInvitationPage /> },
  { path: '/p/:slug', element: <PublicExhibitPage /> },
  {
    element: <Layout />,
    children: [
      ...PAGES.map((p) => ({ path: p.path, element: <RequireRole access={p.access}>{ELEMENTS[p.path]}</RequireRole> })),
      { path: '*', element: <NotFoundPage /> },
    ],
  },
]);
