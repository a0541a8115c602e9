import { BrandMark } from '../../../components/brand';

/** The frame of pages shown without a session: sign-in and the pages of e-mailed links. */
export function PublicFrame({ children }: { children: React.ReactNode }) {
  return (
    <main className="min-h-screen grid place-items-center px-4 py-10">
      <div className="w-full max-w-md">
        <div className="mb-8 flex items-center gap-3">
          <BrandMark />
          <div>
            <p className="text-2xl font-bold tracking-tight">Panelwise</p>
            <p className="text-sm text-muted">Agreement between classifiers, made visible</p>
          </div>
        </div>
        {children}
      </div>
    </main>
  );
}

export function FormAlert({ error }: { error: Error | null }) {
  if (!error) return null;
  return (
    <p role="alert" className="rounded-lg bg-alert-soft px-3 py-2 text-sm text-alert">
      {error.message}
    </p>
  );
}
