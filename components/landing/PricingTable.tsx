import Link from 'next/link';
import { PLANS, PLAN_IDS, formatPrice } from '@/lib/plans';

const number = new Intl.NumberFormat('en');

export function PricingTable() {
  return (
    <div className="mt-10 grid gap-6 md:grid-cols-3">
      {PLAN_IDS.map((id) => {
        const plan = PLANS[id];
        const featured = id === 'bench';
        return (
          <article key={id} className={`pw-card flex flex-col p-6 ${featured ? 'ring-2 ring-moss-500' : ''}`}>
            <h3 className="text-xl font-bold">{plan.name}</h3>
            <p className="mt-1 text-sm text-ink-soft">{plan.tagline}</p>
            <p className="mt-5 font-display text-4xl font-bold">
              {formatPrice(plan.monthlyPrice)}
              {plan.monthlyPrice > 0 && <span className="font-sans text-base font-normal text-ink-faint"> / month</span>}
            </p>
            <ul className="mt-5 space-y-2 text-sm">
              <li>{plan.limits.calculators} published calculator{plan.limits.calculators === 1 ? '' : 's'}</li>
              <li>{number.format(plan.limits.answersPerMonth)} answers a month</li>
              <li>Datasets up to {number.format(plan.limits.datasetRows)} rows</li>
              <li>{plan.limits.seats} seat{plan.limits.seats === 1 ? '' : 's'}</li>
            </ul>
            <Link href={plan.monthlyPrice === 0 ? '/signup' : `/signup?plan=${id}`} className={`mt-6 ${featured ? 'pw-button' : 'pw-button-quiet'}`}>
              {plan.monthlyPrice === 0 ? 'Start free' : `Choose ${plan.name}`}
            </Link>
          </article>
        );
      })}
    </div>
  );
}
