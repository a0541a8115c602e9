/** A stored ISO time as people read it here: date and minutes, in the browser's time zone. */
export function formatTime(iso: string | null): string {
  if (!iso) return '—';
  const d = new Date(iso);
  if (Number.isNaN(d.getTime())) return iso;
  const pad = (n: number) => String(n).padStart(2, '0');
  return `${d.getFullYear()}-${pad(d.getMonth() + 1)}-${pad(d.getDate())} ${pad(d.getHours())}:${pad(d.getMinutes())}`;
}

export const ROLE_NAMES = { lead: 'Classification lead', classifier: 'Classifier', researcher: 'Researcher' } as const;
