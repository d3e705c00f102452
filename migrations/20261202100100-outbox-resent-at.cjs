'use strict';

/** When staff last asked for a message to be sent again: one resend per row within a short window. */
module.exports = {
  async up(q, S) {
    await q.addColumn('email_outbox', 'resentAt', { type: S.DATE, allowNull: true });
  },
  async down(q) {
    await q.removeColumn('email_outbox', 'resentAt');
  },
};
