import { LoadingBlock } from '@/components/ui/loading-block';

export default function Loading() {
  return <LoadingBlock label="Loading the statistics…" rows={8} />;
}
