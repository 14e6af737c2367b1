import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { QueryClientProvider } from '@tanstack/react-query';
import { RouterProvider } from 'react-router/dom';
import { queryClient } from './lib/query-client.ts';
import { router } from './app/router.tsx';
import { UpdatePrompt } from './app/update-prompt.tsx';
import './app/outbox-wiring.ts';
import './index.css';

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <QueryClientProvider client={queryClient}>
      <UpdatePrompt />
      <RouterProvider router={router} />
    </QueryClientProvider>
  </StrictMode>,
);
