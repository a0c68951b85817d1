import { useContext, useEffect, useLayoutEffect } from 'react';
import { UNSAFE_DataRouterContext, UNSAFE_DataRouterStateContext, useLocation, useNavigation } from 'react-router-dom';

/** Where react-router's own scroll restoration keeps the positions (kept, so they carry over). */
const STORAGE_KEY = 'react-router-scroll-positions';
let saved: Record<string, number> = {};
/** The window's scroll position as of the last scroll event. */
let lastY = 0;

/**
 * Scroll restoration as react-router's <ScrollRestoration /> does it (positions by history entry,
 * kept in sessionStorage across reloads; top of the page on a new entry; the hash's element), with
 * one difference: when the page is left it stores the position seen by the last scroll event
 * instead of reading `window.scrollY` then. A page being left has just had every style invalidated
 * by the browser, so reading a layout value at that moment restyles the whole page first — on a
 * 50-cell notebook about 150 ms that the next page waits for.
 */
export function ScrollMemory() {
  const router = useContext(UNSAFE_DataRouterContext)?.router;
  const state = useContext(UNSAFE_DataRouterStateContext);
  const location = useLocation();
  const navigation = useNavigation();

  useEffect(() => {
    window.history.scrollRestoration = 'manual';
    lastY = window.scrollY;
    const onScroll = () => {
      lastY = window.scrollY;
    };
    window.addEventListener('scroll', onScroll, { passive: true });
    return () => {
      window.removeEventListener('scroll', onScroll);
      window.history.scrollRestoration = 'auto';
    };
  }, []);

  useEffect(() => {
    const onPageHide = () => {
      if (navigation.state === 'idle') saved[location.key] = lastY;
      try {
        sessionStorage.setItem(STORAGE_KEY, JSON.stringify(saved));
      } catch {
        // Storage full or refused: positions are then kept for this page's lifetime only.
      }
      window.history.scrollRestoration = 'auto';
    };
    window.addEventListener('pagehide', onPageHide);
    return () => window.removeEventListener('pagehide', onPageHide);
  }, [navigation.state, location.key]);

  useLayoutEffect(() => {
    try {
      const s = sessionStorage.getItem(STORAGE_KEY);
      if (s) saved = JSON.parse(s) as Record<string, number>;
    } catch {
      // Unreadable positions: start without them.
    }
  }, []);

  // Positions of in-app navigations are taken by the router itself, from the live scroll position.
  useLayoutEffect(() => router?.enableScrollRestoration(saved, () => window.scrollY), [router]);

  const hasState = !!state;
  const restore = state?.restoreScrollPosition;
  const preventReset = state?.preventScrollReset;
  useLayoutEffect(() => {
    if (!hasState || restore === false) return;
    if (typeof restore === 'number') {
      window.scrollTo(0, restore);
      return;
    }
    if (location.hash) {
      try {
        const el = document.getElementById(decodeURIComponent(location.hash.slice(1)));
        if (el) {
          el.scrollIntoView();
          return;
        }
      } catch {
        // Not a decodable element id: no scrolling to it.
      }
    }
    if (preventReset === true) return;
    window.scrollTo(0, 0);
  }, [location, hasState, restore, preventReset]);

  return null;
}
