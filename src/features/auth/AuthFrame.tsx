import type { ReactNode } from 'react';
import { StatusLine } from '@/features/system/StatusLine';
import { useDocumentTitle } from '@/lib/useDocumentTitle';

/** The quiet frame around the sign-in, invitation and reset pages. */
export function AuthFrame({ title, children }: { title: string; children: ReactNode }) {
  useDocumentTitle(title);
  return (
    <main className="flex min-h-screen items-center justify-center bg-paper px-4">
      <div className="w-full max-w-sm">
        <div className="mb-6 flex items-center gap-2">
          <img src="/favicon.svg" alt="" className="h-8 w-8" />
          <span className="font-heading text-xl font-bold">Tidegauge</span>
        </div>
        <div className="card p-6">
          <h1 className="mb-4 font-heading text-xl font-bold">{title}</h1>
          {children}
        </div>
        <div className="mt-4 flex justify-center">
          <StatusLine />
        </div>
      </div>
    </main>
  );
}
