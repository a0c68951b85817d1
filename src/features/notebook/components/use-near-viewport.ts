import { useEffect, useRef, useState } from 'react';

/**
 * Whether an element has come within `margin` of the viewport (once true, it stays true): for
 * loading what a cell shows only when it is about to be seen, e.g. a fit's draws for its plots.
 */
export function useNearViewport<T extends Element>(margin = '400px'): [React.RefObject<T | null>, boolean] {
  const ref = useRef<T | null>(null);
  const [near, setNear] = useState(typeof IntersectionObserver === 'undefined');
  useEffect(() => {
    if (near || !ref.current) return;
    const io = new IntersectionObserver((entries) => {
      if (entries.some((e) => e.isIntersecting)) {
        setNear(true);
        io.disconnect();
      }
    }, { rootMargin: margin });
    io.observe(ref.current);
    return () => io.disconnect();
  }, [near, margin]);
  return [ref, near];
}
