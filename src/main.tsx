import { QueryClientProvider } from '@tanstack/react-query';
import { StrictMode } from 'react';
import { createRoot } from 'react-dom/client';
import { RouterProvider } from 'react-router';
import { ToastProvider } from './components/ui/toast';
import { ShopFormat } from './lib/format';
import { queryClient } from './lib/query-client';
import { router } from './routes/router';
import './styles.css';

createRoot(document.getElementById('root')!).render(
  <StrictMode>
    <QueryClientProvider client={queryClient}>
      <ShopFormat>
        <ToastProvider>
          <RouterProvider router={router} />
        </ToastProvider>
      </ShopFormat>
    </QueryClientProvider>
  </StrictMode>,
);
