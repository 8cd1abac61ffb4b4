import { useEffect, useLayoutEffect, useRef, useState, type ReactNode } from 'react';

/**
 * A box whose content may scroll (wide or long tables). When its content does overflow it becomes a
 * named region in the Tab order, so that keyboard users can scroll it too (WCAG 2.1.1).
 */
export function ScrollRegion({ label, className, children, testId }: { label: string; className?: string; children: ReactNode; testId?: string }) {
  const ref = useRef<HTMLDivElement>(null);
  const [scrolls, setScrolls] = useState(false);
  const check = () => {
    const el = ref.current;
    if (el) setScrolls(el.scrollWidth > el.clientWidth + 1 || el.scrollHeight > el.clientHeight + 1);
  };
  // After every render (the content changed), and whenever the box or its content is resized.
  useLayoutEffect(check);
  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    const observer = new ResizeObserver(check);
    observer.observe(el);
    if (el.firstElementChild) observer.observe(el.firstElementChild);
    return () => observer.disconnect();
  }, []);
  return (
    <div ref={ref} className={className} data-testid={testId} {...(scrolls ? { tabIndex: 0, role: 'region', 'aria-label': label } : {})}>
      {children}
    </div>
  );
}
