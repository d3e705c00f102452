'use strict';

/**
 * The whole first schema of Oscillab. Portable column types only (no SQLite-specific
 * features) so the same migration runs on PostgreSQL.
 */

/** @param {import('sequelize').DataTypes} S */
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
    await q.createTable('users', {
      ...id(S),
      email: { type: S.STRING(254), allowNull: false, unique: true },
      name: { type: S.STRING(200), allowNull: false },
      passwordHash: { type: S.STRING(100), allowNull: true },
      isAdmin: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      studentNumber: { type: S.STRING(40), allowNull: true },
      ...stamps(S),
    });

    await q.createTable('courses', {
      ...id(S),
      code: { type: S.STRING(40), allowNull: false, unique: true },
      title: { type: S.STRING(200), allowNull: false },
      archivedAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });

    await q.createTable('cohorts', {
      ...id(S),
      courseId: ref(S, 'courses'),
      name: { type: S.STRING(120), allowNull: false },
      term: { type: S.STRING(60), allowNull: false },
      instrument: { type: S.STRING(120), allowNull: true },
      archivedAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('cohorts', ['courseId', 'name', 'term'], { unique: true });

    // One row per role a person holds in a course; students also name their cohort.
    await q.createTable('course_memberships', {
      ...id(S),
      userId: ref(S, 'users'),
      courseId: ref(S, 'courses'),
      role: { type: S.STRING(20), allowNull: false },
      cohortId: ref(S, 'cohorts', { allowNull: true, onDelete: 'SET NULL' }),
      ...stamps(S),
    });
    await q.addIndex('course_memberships', ['userId', 'courseId', 'role'], { unique: true });
    await q.addIndex('course_memberships', ['courseId', 'role']);

    // A TA marks a whole cohort (studentId null) or named students in it.
    await q.createTable('ta_assignments', {
      ...id(S),
      cohortId: ref(S, 'cohorts'),
      taId: ref(S, 'users'),
      studentId: ref(S, 'users', { allowNull: true }),
      ...stamps(S),
    });
    await q.addIndex('ta_assignments', ['cohortId', 'taId', 'studentId'], { unique: true });

    await q.createTable('practicals', {
      ...id(S),
      courseId: ref(S, 'courses'),
      title: { type: S.STRING(200), allowNull: false },
      species: { type: S.JSON, allowNull: false },
      instructions: { type: S.TEXT, allowNull: false, defaultValue: '' },
      hazardNotes: { type: S.TEXT, allowNull: false, defaultValue: '' },
      mode: { type: S.STRING(20), allowNull: false, defaultValue: 'practice' },
      maxAttempts: { type: S.INTEGER, allowNull: false, defaultValue: 3 },
      lateRule: { type: S.STRING(20), allowNull: false, defaultValue: 'penalty' },
      latePenaltyPerDay: { type: S.FLOAT, allowNull: false, defaultValue: 10 },
      latePenaltyCap: { type: S.FLOAT, allowNull: false, defaultValue: 50 },
      rubric: { type: S.JSON, allowNull: false },
      copiedFromId: ref(S, 'practicals', { allowNull: true, onDelete: 'SET NULL' }),
      archivedAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });

    await q.createTable('practical_cohorts', {
      ...id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      opensAt: { type: S.DATE, allowNull: true },
      deadline: { type: S.DATE, allowNull: false },
      ...stamps(S),
    });
    await q.addIndex('practical_cohorts', ['practicalId', 'cohortId'], { unique: true });

    await q.createTable('quantity_definitions', {
      ...id(S),
      practicalId: ref(S, 'practicals'),
      key: { type: S.STRING(40), allowNull: false },
      species: { type: S.STRING(40), allowNull: false },
      unit: { type: S.STRING(40), allowNull: false },
      marks: { type: S.FLOAT, allowNull: false, defaultValue: 1 },
      uncertaintyRequired: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      referenceKind: { type: S.STRING(20), allowNull: false, defaultValue: 'literature' },
      referenceValueSI: { type: S.FLOAT, allowNull: true },
      referenceNote: { type: S.TEXT, allowNull: true },
      position: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      ...stamps(S),
    });
    await q.addIndex('quantity_definitions', ['practicalId', 'key', 'species'], { unique: true });

    // cohortId null = the course-wide default for that quantity and basis.
    await q.createTable('tolerance_bands', {
      ...id(S),
      quantityDefinitionId: ref(S, 'quantity_definitions'),
      cohortId: ref(S, 'cohorts', { allowNull: true }),
      basis: { type: S.STRING(20), allowNull: false },
      kind: { type: S.STRING(20), allowNull: false },
      inner: { type: S.FLOAT, allowNull: false },
      outer: { type: S.FLOAT, allowNull: true },
      unit: { type: S.STRING(40), allowNull: true },
      updatedById: ref(S, 'users', { allowNull: true, onDelete: 'SET NULL' }),
      ...stamps(S),
    });
    await q.addIndex('tolerance_bands', ['quantityDefinitionId', 'cohortId', 'basis'], { unique: true });

    await q.createTable('submissions', {
      ...id(S),
      practicalId: ref(S, 'practicals'),
      cohortId: ref(S, 'cohorts'),
      studentId: ref(S, 'users'),
      attempt: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      status: { type: S.STRING(30), allowNull: false, defaultValue: 'draft' },
      draft: { type: S.JSON, allowNull: true },
      submittedAt: { type: S.DATE, allowNull: true },
      daysLate: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      latePenalty: { type: S.FLOAT, allowNull: false, defaultValue: 0 },
      isMarkedAttempt: { type: S.BOOLEAN, allowNull: false, defaultValue: true },
      checkSummary: { type: S.JSON, allowNull: true },
      lineListHash: { type: S.STRING(64), allowNull: true },
      flagOutside: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      flagSlip: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      flagLate: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      flagDuplicate: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      flagSpectrumMismatch: { type: S.BOOLEAN, allowNull: false, defaultValue: false },
      proposedTotal: { type: S.FLOAT, allowNull: true },
      awardedTotal: { type: S.FLOAT, allowNull: true },
      maxTotal: { type: S.FLOAT, allowNull: true },
      markedById: ref(S, 'users', { allowNull: true, onDelete: 'SET NULL' }),
      markedAt: { type: S.DATE, allowNull: true },
      releasedAt: { type: S.DATE, allowNull: true },
      extraAttempts: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      resubmissionMessage: { type: S.TEXT, allowNull: true },
      version: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      ...stamps(S),
    });
    await q.addIndex('submissions', ['practicalId', 'studentId', 'attempt'], { unique: true });
    await q.addIndex('submissions', ['cohortId', 'status']);
    await q.addIndex('submissions', ['lineListHash']);

    await q.createTable('submitted_values', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      key: { type: S.STRING(40), allowNull: false },
      species: { type: S.STRING(40), allowNull: false },
      valueText: { type: S.STRING(60), allowNull: false },
      unit: { type: S.STRING(40), allowNull: false, defaultValue: '' },
      uncertaintyText: { type: S.STRING(60), allowNull: true },
      valueSI: { type: S.FLOAT, allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('submitted_values', ['submissionId', 'key', 'species'], { unique: true });

    await q.createTable('line_assignments', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      species: { type: S.STRING(40), allowNull: false },
      branch: { type: S.STRING(1), allowNull: true },
      J: { type: S.INTEGER, allowNull: true },
      wavenumber: { type: S.FLOAT, allowNull: false },
      source: { type: S.STRING(20), allowNull: false, defaultValue: 'student' },
      ...stamps(S),
    });
    await q.addIndex('line_assignments', ['submissionId']);

    await q.createTable('uploads', {
      ...id(S),
      ownerId: ref(S, 'users'),
      submissionId: ref(S, 'submissions', { allowNull: true, onDelete: 'SET NULL' }),
      kind: { type: S.STRING(20), allowNull: false },
      originalName: { type: S.STRING(255), allowNull: false },
      storedName: { type: S.STRING(100), allowNull: false, unique: true },
      sha256: { type: S.STRING(64), allowNull: false },
      size: { type: S.INTEGER, allowNull: false },
      contentType: { type: S.STRING(100), allowNull: false },
      ...stamps(S),
    });
    await q.addIndex('uploads', ['sha256']);
    await q.addIndex('uploads', ['submissionId', 'kind']);

    // One row per reported quantity and basis, so statistics are plain SQL aggregates.
    await q.createTable('check_results', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      key: { type: S.STRING(40), allowNull: false },
      species: { type: S.STRING(40), allowNull: false },
      basis: { type: S.STRING(20), allowNull: false },
      reportedSI: { type: S.FLOAT, allowNull: true },
      expectedSI: { type: S.FLOAT, allowNull: true },
      deviation: { type: S.FLOAT, allowNull: true },
      relativeDeviation: { type: S.FLOAT, allowNull: true },
      verdict: { type: S.STRING(20), allowNull: false },
      slipCodes: { type: S.STRING(400), allowNull: false, defaultValue: '' },
      ...stamps(S),
    });
    await q.addIndex('check_results', ['submissionId']);
    await q.addIndex('check_results', ['key', 'basis']);

    await q.createTable('slip_findings', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      key: { type: S.STRING(40), allowNull: false },
      code: { type: S.STRING(60), allowNull: false },
      ...stamps(S),
    });
    await q.addIndex('slip_findings', ['code']);
    await q.addIndex('slip_findings', ['submissionId']);

    // Marks per item: a quantity (key:species:basis) or a hand-marked rubric item.
    await q.createTable('marks', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      itemKey: { type: S.STRING(100), allowNull: false },
      label: { type: S.STRING(200), allowNull: false },
      maxMarks: { type: S.FLOAT, allowNull: false },
      proposed: { type: S.FLOAT, allowNull: true },
      awarded: { type: S.FLOAT, allowNull: true },
      comment: { type: S.TEXT, allowNull: true },
      markerId: ref(S, 'users', { allowNull: true, onDelete: 'SET NULL' }),
      ...stamps(S),
    });
    await q.addIndex('marks', ['submissionId', 'itemKey'], { unique: true });

    await q.createTable('moderations', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      moderatorId: ref(S, 'users'),
      markerId: ref(S, 'users', { allowNull: true, onDelete: 'SET NULL' }),
      decision: { type: S.STRING(20), allowNull: false },
      totalBefore: { type: S.FLOAT, allowNull: true },
      totalAfter: { type: S.FLOAT, allowNull: true },
      note: { type: S.TEXT, allowNull: true },
      ...stamps(S),
    });

    await q.createTable('feedback_documents', {
      ...id(S),
      submissionId: ref(S, 'submissions'),
      storedName: { type: S.STRING(100), allowNull: false },
      sha256: { type: S.STRING(64), allowNull: false },
      size: { type: S.INTEGER, allowNull: false },
      ...stamps(S),
    });

    await q.createTable('email_outbox', {
      ...id(S),
      dedupeKey: { type: S.STRING(200), allowNull: false, unique: true },
      toAddress: { type: S.STRING(254), allowNull: false },
      subject: { type: S.STRING(300), allowNull: false },
      textBody: { type: S.TEXT, allowNull: false },
      htmlBody: { type: S.TEXT, allowNull: true },
      feedbackDocumentId: ref(S, 'feedback_documents', { allowNull: true, onDelete: 'SET NULL' }),
      submissionId: ref(S, 'submissions', { allowNull: true, onDelete: 'SET NULL' }),
      status: { type: S.STRING(20), allowNull: false, defaultValue: 'queued' },
      attempts: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: S.DATE, allowNull: false },
      lockedUntil: { type: S.DATE, allowNull: true },
      lastError: { type: S.TEXT, allowNull: true },
      messageId: { type: S.STRING(300), allowNull: true },
      sentAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });
    await q.addIndex('email_outbox', ['status', 'nextAttemptAt']);

    await q.createTable('audit_log', {
      ...id(S),
      actorId: ref(S, 'users', { allowNull: true, onDelete: 'SET NULL' }),
      action: { type: S.STRING(80), allowNull: false },
      entityType: { type: S.STRING(60), allowNull: false },
      entityId: { type: S.INTEGER, allowNull: true },
      before: { type: S.JSON, allowNull: true },
      after: { type: S.JSON, allowNull: true },
      createdAt: { type: S.DATE, allowNull: false },
    });
    await q.addIndex('audit_log', ['entityType', 'entityId']);

    // Invitation and password-reset links: only a hash of the token is stored.
    await q.createTable('one_time_tokens', {
      ...id(S),
      userId: ref(S, 'users'),
      purpose: { type: S.STRING(20), allowNull: false },
      tokenHash: { type: S.STRING(64), allowNull: false, unique: true },
      expiresAt: { type: S.DATE, allowNull: false },
      usedAt: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });

    // Failed sign-ins per account and per client address, for throttling.
    await q.createTable('sign_in_failures', {
      ...id(S),
      subject: { type: S.STRING(300), allowNull: false, unique: true },
      failures: { type: S.INTEGER, allowNull: false, defaultValue: 0 },
      firstFailureAt: { type: S.DATE, allowNull: false },
      blockedUntil: { type: S.DATE, allowNull: true },
      ...stamps(S),
    });
  },

  async down(q) {
    for (const table of [
      'sign_in_failures',
      'one_time_tokens',
      'audit_log',
      'email_outbox',
      'feedback_documents',
      'moderations',
      'marks',
      'slip_findings',
      'check_results',
      'uploads',
      'line_assignments',
      'submitted_values',
      'submissions',
      'tolerance_bands',
      'quantity_definitions',
      'practical_cohorts',
      'practicals',
      'ta_assignments',
      'course_memberships',
      'cohorts',
      'courses',
      'users',
    ]) {
      await q.dropTable(table);
    }
  },
};
