import { Link } from 'react-router-dom';
import { NotFound } from '@/components/not-found';
import { Logo } from '@/components/ui/logo';

export default function NotFoundRoute() {
  return (
    <div className="min-h-screen px-6 py-10">
      <div className="mx-auto max-w-5xl">
        <Link to="/" aria-label="Slackline home">
          <Logo />
        </Link>
        <NotFound />
      </div>
    </div>
  );
}
