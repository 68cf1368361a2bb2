import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { RouterProvider } from 'react-router-dom';
import '@fontsource/literata/400.css';
import '@fontsource/literata/400-italic.css';
import '@fontsource/literata/600.css';
import './index.css';
import { AppProvider } from './app/provider';
import { createQueryClient } from './app/query-client';
import { createAppRouter } from './app/router';

const queryClient = createQueryClient();
const router = createAppRouter(queryClient);

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <AppProvider client={queryClient}>
      <RouterProvider router={router} />
    </AppProvider>
  </StrictMode>,
);
