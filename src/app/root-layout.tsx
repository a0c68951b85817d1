import { Outlet, ScrollRestoration } from 'react-router-dom';
import { NavigationProgress } from '@/components/layout/app-shell';

export function RootLayout() {
  return (
    <>
      <NavigationProgress />
      <Outlet />
      <ScrollRestoration />
    </>
  );
}
