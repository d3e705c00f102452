'use strict';

/** The marker's overall comment on a submission, printed in the feedback PDF. */
module.exports = {
  async up(q, S) {
    await q.addColumn('submissions', 'markerComment', { type: S.TEXT, allowNull: true });
  },
  async down(q) {
    await q.removeColumn('submissions', 'markerComment');
  },
};
