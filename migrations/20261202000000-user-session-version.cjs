'use strict';

/**
 * A counter carried in every session token. Setting a password (reset or invitation) raises it,
 * so sessions signed in before no longer authorise anything.
 */
module.exports = {
  async up(q, S) {
    await q.addColumn('users', 'sessionVersion', { type: S.INTEGER, allowNull: false, defaultValue: 0 });
  },
  async down(q) {
    await q.removeColumn('users', 'sessionVersion');
  },
};
