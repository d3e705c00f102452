'use strict';

/**
 * The e-mails of a submission, found by an index rather than a pass over the whole outbox: the
 * marking queue shows each row's last release e-mail, and a department's outbox holds one row per
 * release (100,000 rows over five years).
 */
module.exports = {
  async up(q) {
    await q.addIndex('email_outbox', ['submissionId', 'id'], { name: 'email_outbox_submission' });
  },

  async down(q) {
    await q.removeIndex('email_outbox', 'email_outbox_submission');
  },
};
