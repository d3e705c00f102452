'use strict';

/**
 * Connection to the department's learning platform (LTI 1.3 / LTI Advantage): the platforms
 * Oscillab is registered with, Oscillab's own signing keys, the platform courses, items and people
 * mapped to Oscillab's, the single-use launch states, and the durable outbox of scores sent back.
 * Portable column types only, so the same migration runs on SQLite and PostgreSQL.
 */

function stamps(S) {
  return {
    createdAt: { type: S.DATE, allowNull: false },
    updatedAt: { type: S.DATE, allowNull: false },
  };
}

function id(S) {
  return { id: { type: S.INTEGER, primaryKey: true, autoIncrement: true, allowNull: false } };
}

function ref(S, table, { allowNull = false, onDelete = 'CASCADE' } = {}) {
  return { type: S.INTEGER, allowNull, references: { model: table, key: 'id' }, onDelete, onUpdate: 'CASCADE' };
}

module.exports = {
  async up(q, S) {
    // Oscillab's own key pairs: the active one signs; retired ones stay published for a while.
    await q.createTable('lti_tool_keys', {
      ...id(S),
      kid: { type: S.STRING(100), allowNull: false, unique: true },
      publicJwk: { type: S.TEXT, allowNull: false },
      privateKeyPem: { type: S.TEXT, allowNull: false },
      status: { type: S.STRING(20), allowNull: false, defaultValue: 'active' },
      retiredAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });

    await q.createTable('lti_registrations', {
      ...id(S),
      name: { type: S.STRING(200), allowNull: false },
      issuer: { type: S.STRING(500), allowNull: false },
      clientId: { type: S.STRING(255), allowNull: false },
      authLoginUrl: { type: S.STRING(1000), allowNull: false },
      authTokenUrl: { type: S.STRING(1000), allowNull: false },
      keySetUrl: { type: S.STRING(1000), allowNull: false },
      tokenAudience: { type: S.STRING(1000), allowNull: true },
      active: { type: S.BOOLEAN, allowNull: false, defaultValue: true },
      ...stamps(S),
    });
    await q.addIndex('lti_registrations', ['issuer', 'clientId'], { unique: true, name: 'lti_registrations_issuer_client' });

    await q.createTable('lti_deployments', {
      ...id(S),
      registrationId: ref(S, 'lti_registrations'),
      deploymentId: { type: S.STRING(255), allowNull: false },
      ...stamps(S),
    });
    await q.addIndex('lti_deployments', ['registrationId', 'deploymentId'], {
      unique: true,
      name: 'lti_deployments_registration_deployment',
    });

    // A platform course (context) connected to one Oscillab course.
    await q.createTable('lti_contexts', {
      ...id(S),
      registrationId: ref(S, 'lti_registrations'),
      contextId: { type: S.STRING(255), allowNull: false },
      courseId: ref(S, 'courses'),
      defaultCohortId: ref(S, 'cohorts', { allowNull: true, onDelete: 'SET NULL' }),
      title: { type: S.STRING(300), allowNull: true },
      membershipsUrl: { type: S.STRING(1000), allowNull: true },
      lineItemsUrl: { type: S.STRING(1000), allowNull: true },
      agsScopes: { type: S.TEXT, allowNull: true },
      rosterSyncedAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('lti_contexts', ['registrationId', 'contextId'], { unique: true, name: 'lti_contexts_registration_context' });
    await q.addIndex('lti_contexts', ['courseId'], { name: 'lti_contexts_course' });

    // A platform item (resource link) that opens one practical.
    await q.createTable('lti_resource_links', {
      ...id(S),
      ltiContextId: ref(S, 'lti_contexts'),
      resourceLinkId: { type: S.STRING(255), allowNull: false },
      practicalId: ref(S, 'practicals'),
      title: { type: S.STRING(300), allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('lti_resource_links', ['ltiContextId', 'resourceLinkId'], { unique: true, name: 'lti_resource_links_context_link' });

    // The platform's gradebook column for a practical.
    await q.createTable('lti_line_items', {
      ...id(S),
      ltiContextId: ref(S, 'lti_contexts'),
      practicalId: ref(S, 'practicals'),
      url: { type: S.STRING(1000), allowNull: false },
      ...stamps(S),
    });
    await q.addIndex('lti_line_items', ['ltiContextId', 'practicalId'], { unique: true, name: 'lti_line_items_context_practical' });

    // A platform user (its stable `sub`) mapped to one Oscillab account, once.
    await q.createTable('lti_user_links', {
      ...id(S),
      registrationId: ref(S, 'lti_registrations'),
      sub: { type: S.STRING(255), allowNull: false },
      userId: ref(S, 'users'),
      ...stamps(S),
    });
    await q.addIndex('lti_user_links', ['registrationId', 'sub'], { unique: true, name: 'lti_user_links_registration_sub' });
    await q.addIndex('lti_user_links', ['registrationId', 'userId'], { unique: true, name: 'lti_user_links_registration_user' });

    // One row per login initiation: the state (only its hash) and the single-use nonce.
    await q.createTable('lti_launch_states', {
      ...id(S),
      stateHash: { type: S.STRING(64), allowNull: false, unique: true },
      nonce: { type: S.STRING(64), allowNull: false, unique: true },
      registrationId: ref(S, 'lti_registrations'),
      expiresAt: { type: S.DATE, allowNull: false },
      usedAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('lti_launch_states', ['expiresAt'], { name: 'lti_launch_states_expires' });

    // Scores waiting to go to the platform's gradebook; written in the release's own transaction.
    await q.createTable('lti_score_outbox', {
      ...id(S),
      dedupeKey: { type: S.STRING(200), allowNull: false, unique: true },
      ltiContextId: ref(S, 'lti_contexts'),
      practicalId: ref(S, 'practicals'),
      submissionId: ref(S, 'submissions'),
      userId: ref(S, 'users'),
      platformUserId: { type: S.STRING(255), allowNull: false },
      scoreGiven: { type: S.FLOAT, allowNull: false },
      scoreMaximum: { type: S.FLOAT, allowNull: false },
      comment: { type: S.TEXT, allowNull: true },
      scoredAt: { type: S.DATE, allowNull: false },
      lineItemUrl: { type: S.STRING(1000), allowNull: true },
      status: { type: S.STRING(20), allowNull: false, defaultValue: 'queued' },
      attempts: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: S.DATE, allowNull: false },
      lockedUntil: { type: S.DATE, allowNull: true },
      lastError: { type: S.TEXT, allowNull: true },
      sentAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('lti_score_outbox', ['status', 'nextAttemptAt'], { name: 'lti_score_outbox_due' });
    await q.addIndex('lti_score_outbox', ['submissionId'], { name: 'lti_score_outbox_submission' });
  },

  async down(q) {
    for (const table of [
      'lti_score_outbox',
      'lti_launch_states',
      'lti_user_links',
      'lti_line_items',
      'lti_resource_links',
      'lti_contexts',
      'lti_deployments',
      'lti_registrations',
      'lti_tool_keys',
    ]) {
      await q.dropTable(table);
    }
  },
};
