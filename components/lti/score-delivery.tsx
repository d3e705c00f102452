import { models } from '@/models';
import { scoreDeliveries } from '@/lib/lti/scores';
import { ScoreDeliveryTable } from './score-delivery-table';

/**
 * Beside the e-mail delivery on the marking page: where the submission's score stands on its way
 * to the learning platform's gradebook. Shows nothing for a course not connected to a platform.
 */
export async function ScoreDelivery({ submissionId, courseId }: { submissionId: number; courseId: number }) {
  const connected = await models().LtiContext.count({ where: { courseId } });
  if (!connected) return null;
  return <ScoreDeliveryTable submissionId={submissionId} initial={await scoreDeliveries(submissionId)} />;
}
