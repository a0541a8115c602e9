/** Plain, accessible e-mails: a text part and a simple HTML part with the same words. */

const escapeHtml = (s: string) =>
  s.replace(/[&<>"']/g, (c) => ({ '&': '&amp;', '<': '&lt;', '>': '&gt;', '"': '&quot;', "'": '&#39;' })[c] ?? c);

export interface LinkMail {
  greeting: string;
  paragraphs: string[];
  action: string;
  link: string;
  footer: string;
}

export function linkMail(mail: LinkMail): { text: string; html: string } {
  const text = [
    mail.greeting,
    '',
    ...mail.paragraphs.flatMap((p) => [p, '']),
    `${mail.action}: ${mail.link}`,
    '',
    mail.footer,
    '',
    '— Panelwise',
  ].join('\n');
  const html = [
    '<!doctype html><html><body style="font-family:system-ui,sans-serif;color:#1d2a33;line-height:1.5">',
    `<p>${escapeHtml(mail.greeting)}</p>`,
    ...mail.paragraphs.map((p) => `<p>${escapeHtml(p)}</p>`),
    `<p><a href="${escapeHtml(mail.link)}" style="display:inline-block;background:#1f4e5f;color:#fff;padding:10px 16px;border-radius:8px;text-decoration:none;font-weight:600">${escapeHtml(mail.action)}</a></p>`,
    `<p style="font-size:13px;color:#5b6b75">If the button does not work, open this address: ${escapeHtml(mail.link)}</p>`,
    `<p style="font-size:13px;color:#5b6b75">${escapeHtml(mail.footer)}</p>`,
    '<p>— Panelwise</p></body></html>',
  ].join('\n');
  return { text, html };
}

export const ROLE_WORDS = { lead: 'classification lead', classifier: 'classifier', researcher: 'researcher' } as const;
