'use strict';

/**
 * Whole-spectrum analysis in the product.
 * - practicals.spectrumSamples: which spectra a practical takes and which bands each holds
 *   ([{ key, label, molecules, bands }]); null means one spectrum holding every molecule of the
 *   practical (the default).
 * - practicals.spectrumAnalysis: the instructor's switch for the third comparison, "from your
 *   spectrum" (Oscillab's own analysis of the student's spectrum), on the marking screen and in
 *   the feedback.
 * - uploads.sample: which of the practical's spectra an uploaded spectrum is.
 * - uploads.analysis: the analysis of that spectrum, made once when it is uploaded (JSON).
 */
module.exports = {
  async up(q, S) {
    await q.addColumn('practicals', 'spectrumSamples', { type: S.JSON, allowNull: true });
    await q.addColumn('practicals', 'spectrumAnalysis', { type: S.BOOLEAN, allowNull: false, defaultValue: false });
    await q.addColumn('uploads', 'sample', { type: S.STRING(40), allowNull: true });
    await q.addColumn('uploads', 'analysis', { type: S.JSON, allowNull: true });
  },
  async down(q) {
    await q.removeColumn('uploads', 'analysis');
    await q.removeColumn('uploads', 'sample');
    await q.removeColumn('practicals', 'spectrumAnalysis');
    await q.removeColumn('practicals', 'spectrumSamples');
  },
};
