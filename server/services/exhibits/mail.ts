/** Mail about exhibits under review. */
import { composeMail } from '../../mail/mailer.js';
import type { PublicUser } from '../../schemas/people.js';
import type { ExhibitState } from '../../schemas/exhibits.js';
import type { ExhibitDeps } from './read.js';

/** Editors hear of submissions; the author hears of returns, approvals and publication. */
export async function notify(deps: ExhibitDeps, actor: PublicUser, row: Record<string, any>, to: ExhibitState, comment?: string) {
  const link = `${deps.config.publicOrigin}/exhibits/${row.id}`;
  if (to === 'in_review') {
    const editors = await deps.db('users as u').join('user_roles as r', 'r.user_id', 'u.id').where('r.role', 'editor').andWhere('u.status', 'active').whereNot('u.id', row.author_id).select('u.email', 'u.name');
    if (!editors.length) return;
    const { text, html } = composeMail({
      greeting: 'Hello,',
      paragraphs: [`${actor.name} submitted the exhibit “${row.title}” for review.`, 'It is on the Review desk, oldest submissions first.'],
      action: { label: 'Open the exhibit', url: link },
    });
    await deps.mailer.send({ to: editors.map((e) => e.email), subject: `For review: ${row.title}`, text, html });
    return;
  }
  if (to === 'returned' || to === 'approved' || to === 'published') {
    const words = { returned: 'returned your exhibit with comments', approved: 'approved your exhibit', published: 'published your exhibit' } as const;
    const { text, html } = composeMail({
      greeting: `Hello ${row.author_name},`,
      paragraphs: [`${actor.name} ${words[to]} “${row.title}”.`, ...(comment ? [`Comment: ${comment}`] : [])],
      action: { label: 'Open the exhibit', url: link },
    });
    const subject = { returned: 'Returned', approved: 'Approved', published: 'Published' }[to];
    await deps.mailer.send({ to: row.author_email, subject: `${subject}: ${row.title}`, text, html });
  }
}
