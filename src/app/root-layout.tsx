import { Outlet } from 'react-router-dom';
import { ScrollMemory } from './scroll-memory';
import { NavigationProgress } from '@/components/layout/app-shell';

export function RootLayout() {
  return (
    <>
      <NavigationProgress />
      <Outlet />
      <ScrollMemory />
    </>
  );
}
