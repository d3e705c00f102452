import { LoadingBlock } from '@/components/ui/loading-block';

export default function Loading() {
  return <LoadingBlock label="Loading the submission: values, slips and plots…" rows={8} />;
}
