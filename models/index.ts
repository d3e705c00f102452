import { sequelize } from '@/lib/db';
import { User } from './user';
import { Course } from './course';
import { Cohort } from './cohort';
import { CourseMembership } from './course-membership';
import { TaAssignment } from './ta-assignment';
import { Practical } from './practical';
import { PracticalCohort } from './practical-cohort';
import { QuantityDefinition } from './quantity-definition';
import { ToleranceBand } from './tolerance-band';
import { Submission } from './submission';
import { SubmittedValue } from './submitted-value';
import { LineAssignment } from './line-assignment';
import { Upload } from './upload';
import { CheckResult } from './check-result';
import { SlipFinding } from './slip-finding';
import { Mark } from './mark';
import { Moderation } from './moderation';
import { FeedbackDocument } from './feedback-document';
import { EmailOutbox } from './email-outbox';
import { AuditEntry } from './audit-entry';
import { OneTimeToken } from './one-time-token';
import { SignInFailure } from './sign-in-failure';
import { EndedSession } from './ended-session';
import { LtiToolKey } from './lti-tool-key';
import { LtiRegistration } from './lti-registration';
import { LtiDeployment } from './lti-deployment';
import { LtiContext } from './lti-context';
import { LtiResourceLink } from './lti-resource-link';
import { LtiLineItem } from './lti-line-item';
import { LtiUserLink } from './lti-user-link';
import { LtiLaunchState } from './lti-launch-state';
import { LtiScoreOutbox } from './lti-score-outbox';
import {
  StatisticsGroup,
  StatisticsQuantity,
  StatisticsMarker,
  StatisticsSlip,
  StatisticsSlipCode,
  StatisticsSubmission,
  StatisticsValue,
  StatisticsSlipFinding,
  StatisticsMeta,
} from './statistics';
import { keepStatisticsHooks } from '@/lib/statistics/keep-hooks';

const all = {
  User,
  Course,
  Cohort,
  CourseMembership,
  TaAssignment,
  Practical,
  PracticalCohort,
  QuantityDefinition,
  ToleranceBand,
  Submission,
  SubmittedValue,
  LineAssignment,
  Upload,
  CheckResult,
  SlipFinding,
  Mark,
  Moderation,
  FeedbackDocument,
  EmailOutbox,
  AuditEntry,
  OneTimeToken,
  SignInFailure,
  EndedSession,
  // The learning-platform connection (lib/lti/).
  LtiToolKey,
  LtiRegistration,
  LtiDeployment,
  LtiContext,
  LtiResourceLink,
  LtiLineItem,
  LtiUserLink,
  LtiLaunchState,
  LtiScoreOutbox,
  // Kept statistics (lib/statistics/keep.ts).
  StatisticsGroup,
  StatisticsQuantity,
  StatisticsMarker,
  StatisticsSlip,
  StatisticsSlipCode,
  StatisticsSubmission,
  StatisticsValue,
  StatisticsSlipFinding,
  StatisticsMeta,
};

let boundTo: unknown = null;

/** Bind every model to the current connection (once per connection) and set up associations. */
export function models() {
  const s = sequelize();
  if (boundTo === s) return all;
  for (const m of Object.values(all)) m.initModel(s);

  Course.hasMany(Cohort, { foreignKey: 'courseId' });
  Cohort.belongsTo(Course, { foreignKey: 'courseId' });
  CourseMembership.belongsTo(User, { foreignKey: 'userId' });
  CourseMembership.belongsTo(Course, { foreignKey: 'courseId' });
  CourseMembership.belongsTo(Cohort, { foreignKey: 'cohortId' });
  User.hasMany(CourseMembership, { foreignKey: 'userId' });
  TaAssignment.belongsTo(User, { foreignKey: 'taId', as: 'ta' });
  TaAssignment.belongsTo(User, { foreignKey: 'studentId', as: 'student' });
  TaAssignment.belongsTo(Cohort, { foreignKey: 'cohortId' });
  Practical.belongsTo(Course, { foreignKey: 'courseId' });
  Practical.hasMany(PracticalCohort, { foreignKey: 'practicalId' });
  PracticalCohort.belongsTo(Practical, { foreignKey: 'practicalId' });
  PracticalCohort.belongsTo(Cohort, { foreignKey: 'cohortId' });
  Practical.hasMany(QuantityDefinition, { foreignKey: 'practicalId' });
  QuantityDefinition.belongsTo(Practical, { foreignKey: 'practicalId' });
  QuantityDefinition.hasMany(ToleranceBand, { foreignKey: 'quantityDefinitionId' });
  ToleranceBand.belongsTo(QuantityDefinition, { foreignKey: 'quantityDefinitionId' });
  Submission.belongsTo(Practical, { foreignKey: 'practicalId' });
  Submission.belongsTo(Cohort, { foreignKey: 'cohortId' });
  Submission.belongsTo(User, { foreignKey: 'studentId', as: 'student' });
  Submission.belongsTo(User, { foreignKey: 'markedById', as: 'marker' });
  Submission.hasMany(SubmittedValue, { foreignKey: 'submissionId' });
  Submission.hasMany(LineAssignment, { foreignKey: 'submissionId' });
  Submission.hasMany(Upload, { foreignKey: 'submissionId' });
  Submission.hasMany(CheckResult, { foreignKey: 'submissionId' });
  Submission.hasMany(SlipFinding, { foreignKey: 'submissionId' });
  Submission.hasMany(Mark, { foreignKey: 'submissionId' });
  Submission.hasMany(FeedbackDocument, { foreignKey: 'submissionId' });
  Submission.hasMany(EmailOutbox, { foreignKey: 'submissionId' });
  Moderation.belongsTo(Submission, { foreignKey: 'submissionId' });
  // The kept statistics follow every change made through these models (lib/statistics/keep.ts).
  keepStatisticsHooks(all as never);

  boundTo = s;
  return all;
}

export {
  User,
  Course,
  Cohort,
  CourseMembership,
  TaAssignment,
  Practical,
  PracticalCohort,
  QuantityDefinition,
  ToleranceBand,
  Submission,
  SubmittedValue,
  LineAssignment,
  Upload,
  CheckResult,
  SlipFinding,
  Mark,
  Moderation,
  FeedbackDocument,
  EmailOutbox,
  AuditEntry,
  OneTimeToken,
  SignInFailure,
  EndedSession,
  LtiToolKey,
  LtiRegistration,
  LtiDeployment,
  LtiContext,
  LtiResourceLink,
  LtiLineItem,
  LtiUserLink,
  LtiLaunchState,
  LtiScoreOutbox,
};
