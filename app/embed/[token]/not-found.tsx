import { CalculatorMissing } from '@/components/embed/CalculatorFrame';

/**
 * An unknown or replaced calculator address. Shown inside whatever frames it (the
 * studio preview, a host page), so it carries none of the app's chrome or wording.
 */
export default function CalculatorNotFound() {
  return <CalculatorMissing />;
}
