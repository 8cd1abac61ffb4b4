import { useEffect } from 'react';

/** The browser tab's title names the page: "<page> — Tidegauge" (WCAG 2.4.2); back to the product's name when the page goes. */
export function useDocumentTitle(title: string | null | undefined) {
  useEffect(() => {
    if (!title) return;
    document.title = `${title} — Tidegauge`;
    return () => {
      document.title = 'Tidegauge';
    };
  }, [title]);
}
