import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { RouterProvider } from 'react-router-dom';
import '@fontsource/ibm-plex-sans/400.css';
import '@fontsource/ibm-plex-sans/500.css';
import '@fontsource/ibm-plex-sans/600.css';
import '@fontsource/ibm-plex-sans/400-italic.css';
import '@fontsource/jetbrains-mono/400.css';
import '@fontsource/jetbrains-mono/500.css';
import './styles/app.css';
import { AppProvider } from './app/provider';
import { createAppRouter } from './app/router';
import { makeQueryClient } from './lib/query-client';
import { withNext } from './lib/safe-next';

// When a session ends underneath an open page (expired, or signed out elsewhere), go to sign in
// and come back to the same page afterwards.
const queryClient = makeQueryClient({
  onSessionLost: () => {
    const here = window.location.pathname + window.location.search;
    if (!here.startsWith('/sign-in')) void router.navigate(withNext('/sign-in', here), { replace: true });
  },
});
const router = createAppRouter(queryClient);

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <AppProvider client={queryClient}>
      <RouterProvider router={router} />
    </AppProvider>
  </StrictMode>,
);
