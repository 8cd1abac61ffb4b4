import { createBrowserRouter } from 'react-router-dom';
import { Layout } from '@/components/Layout';
import { AcceptInvitationPage } from '@/features/auth/AcceptInvitationPage';
import { ForgotPasswordPage, ResetPasswordPage } from '@/features/auth/PasswordPages';
import { RequireRole } from '@/features/auth/RequireRole';
import { SignInPage } from '@/features/auth/SignInPage';
import { MailboxPage } from '@/features/people/MailboxPage';
import { PeoplePage } from '@/features/people/PeoplePage';
import { ProfilePage } from '@/features/people/ProfilePage';
import { HomePage } from '@/routes/HomePage';
import { NotFoundPage } from '@/routes/NotFoundPage';
import { CataloguePage } from '@/features/catalogue/CataloguePage';
import { EditSeriesPage, NewSeriesPage } from '@/features/catalogue/SeriesForm';
import { LoadsPage } from '@/features/catalogue/LoadsPage';
import { SeriesPage } from '@/features/catalogue/SeriesPage';
import { StudiesPage } from '@/features/studies/StudiesPage';
import { StudyPage } from '@/features/studies/StudyWorkspace';
import { BoardPage } from '@/features/boards/BoardPage';
import { BoardsPage } from '@/features/boards/BoardsPage';
import { ExhibitPage } from '@/features/exhibits/ExhibitPage';
import { ExhibitsPage, ReviewDeskPage } from '@/features/exhibits/ExhibitsPage';
import { NewExhibitPage } from '@/features/exhibits/NewExhibitPage';
import { PublicExhibitPage } from '@/features/exhibits/PublicExhibitPage';

export const router = createBrowserRouter([
  { path: '/sign-in', element: <SignInPage /> },
  { path: '/forgot-password', element: <ForgotPasswordPage /> },
  { path: '/reset-password/:token', element: <ResetPasswordPage /> },
  { path: '/invite/:token', element: <AcceptInvitationPage /> },
  { path: '/p/:slug', element: <PublicExhibitPage /> },
  {
    element: <Layout />,
    children: [
      { index: true, element: <HomePage /> },
      { path: 'catalogue', element: <CataloguePage /> },
      { path: 'catalogue/new', element: <RequireRole roles={['steward', 'admin']}><NewSeriesPage /></RequireRole> },
      { path: 'catalogue/loads', element: <RequireRole roles={['steward', 'admin']}><LoadsPage /></RequireRole> },
      { path: 'catalogue/:id', element: <SeriesPage /> },
      { path: 'catalogue/:id/edit', element: <RequireRole roles={['steward', 'admin']}><EditSeriesPage /></RequireRole> },
      { path: 'studies', element: <RequireRole roles={['economist', 'editor', 'admin']}><StudiesPage /></RequireRole> },
      { path: 'studies/new', element: <RequireRole roles={['economist']}><StudyPage /></RequireRole> },
      { path: 'studies/:id', element: <RequireRole roles={['economist', 'editor', 'admin']}><StudyPage /></RequireRole> },
      { path: 'boards', element: <BoardsPage /> },
      { path: 'boards/:id', element: <BoardPage /> },
      { path: 'exhibits', element: <ExhibitsPage /> },
      { path: 'exhibits/new', element: <RequireRole roles={['economist']}><NewExhibitPage /></RequireRole> },
      { path: 'exhibits/:id', element: <ExhibitPage /> },
      { path: 'review', element: <RequireRole roles={['editor']}><ReviewDeskPage /></RequireRole> },
      { path: 'people', element: <RequireRole roles={['admin']}><PeoplePage /></RequireRole> },
      { path: 'people/mailbox', element: <RequireRole roles={['admin']}><MailboxPage /></RequireRole> },
      { path: 'profile', element: <ProfilePage /> },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
]);
