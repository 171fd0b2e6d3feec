import { Skeleton } from "@/components/ui/Page";

export default function Loading() {
  return (
    <div className="max-w-3xl space-y-6 py-4">
      <div className="h-7 w-64 animate-pulse rounded bg-surface-sunk" />
      <Skeleton lines={5} />
    </div>
  );
}
