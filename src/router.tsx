import { createBrowserRouter } from 'react-router-dom';
import { Layout } from '@/components/Layout';
import { HomePage } from '@/routes/HomePage';
import { NotFoundPage } from '@/routes/NotFoundPage';
import { PlaceholderPage } from '@/routes/PlaceholderPage';

export const router = createBrowserRouter([
  {
    element: <Layout />,
    children: [
      { index: true, element: <HomePage /> },
      { path: 'catalogue/*', element: <PlaceholderPage title="Catalogue" /> },
      { path: 'studies/*', element: <PlaceholderPage title="Studies" /> },
      { path: 'boards/*', element: <PlaceholderPage title="Boards" /> },
      { path: 'review/*', element: <PlaceholderPage title="Review desk" /> },
      { path: 'people/*', element: <PlaceholderPage title="People" /> },
      { path: '*', element: <NotFoundPage /> },
    ],
  },
]);
