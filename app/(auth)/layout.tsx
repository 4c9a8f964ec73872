import { PlainFrame } from '@/components/brand/PlainFrame';

/** Account pages: one calm column on paper, the mark linking home. */
export default function AuthLayout({ children }: { children: React.ReactNode }) {
  return (
    <PlainFrame>
      <div className="w-full max-w-md">{children}</div>
    </PlainFrame>
  );
}
