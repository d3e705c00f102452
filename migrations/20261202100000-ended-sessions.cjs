'use strict';

/**
 * Sessions ended by signing out. A session cookie carries a random session id (sid); signing out
 * records it here until the cookie would have expired anyway, so a copy of the cookie made before
 * sign-out no longer authorises anything. ("Sign out everywhere" raises users.sessionVersion instead.)
 */
module.exports = {
  async up(q, S) {
    await q.createTable('ended_sessions', {
      id: { type: S.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false },
      sessionId: { type: S.STRING(64), allowNull: false, unique: true },
      userId: { type: S.INTEGER, allowNull: true, references: { model: 'users', key: 'id' }, onDelete: 'CASCADE' },
      expiresAt: { type: S.DATE, allowNull: false },
      createdAt: { type: S.DATE, allowNull: false },
    });
    await q.addIndex('ended_sessions', ['expiresAt'], { name: 'ended_sessions_expires_at' });
  },
  async down(q) {
    await q.dropTable('ended_sessions');
  },
};
