import { LoadingBlock } from '@/components/ui/loading-block';

export default function Loading() {
  return <LoadingBlock label="Loading the practical and your draft…" rows={8} />;
}
