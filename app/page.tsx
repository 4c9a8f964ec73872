import Link from 'next/link';
import { SiteHeader } from '@/components/brand/SiteHeader';
import { PricingTable } from '@/components/landing/PricingTable';
import { MembershipSketch } from '@/components/landing/MembershipSketch';
import { demoExampleAnswer } from '@/lib/demo/landing-example';

// The example answer is worked out from the served demo calculator on each visit, never at build time.
export const dynamic = 'force-dynamic';

const steps = [
  { title: 'Bring a table', body: 'Upload a CSV of measurements. Partwise types every column, shows its range and spread, and names any row it cannot read.' },
  { title: 'Let the data find its groups', body: 'Fit Gaussian mixtures across component counts and covariance shapes, with restarts. BIC and AIC say which fits best; you decide.' },
  { title: 'Name what you found', body: 'Give each cluster a label, a sentence and a colour. Set the fields, units and ranges a visitor may enter.' },
  { title: 'Publish a calculator', body: 'Paste one snippet into your site. Visitors enter their own values and see how much they resemble each group, with a notice when they resemble none.' },
];

export default async function LandingPage() {
  const example = await demoExampleAnswer();
  return (
    <>
      <SiteHeader />
      <main>
        <section className="mx-auto grid max-w-6xl items-center gap-12 px-6 pb-20 pt-10 md:grid-cols-[1.1fr_1fr]">
          <div>
            <p className="mb-4 inline-block rounded-full bg-saffron-100 px-3 py-1 text-sm font-bold text-saffron-700">Mixture models, made shareable</p>
            <h1 className="text-4xl font-bold leading-tight text-ink md:text-5xl">
              Find the groups in your measurements, then let anyone see where they fit.
            </h1>
            <p className="mt-6 max-w-xl text-lg text-ink-soft">
              Partwise fits Gaussian mixture models to the tables analysts already keep — sports clubs, labs, field surveys,
              product teams — and turns the result into a small calculator that any website can embed.
            </p>
            <div className="mt-8 flex flex-wrap gap-3">
              <Link href="/signup" className="pw-button">Create a workspace</Link>
              <Link href="/#how" className="pw-button-quiet">See how it works</Link>
            </div>
          </div>
          <MembershipSketch example={example} />
        </section>

        <section id="how" className="bg-white/60 py-20">
          <div className="mx-auto max-w-6xl px-6">
            <h2 className="text-3xl font-bold">From a spreadsheet to an answer in four steps</h2>
            <ol className="mt-10 grid gap-6 md:grid-cols-4">
              {steps.map((step, i) => (
                <li key={step.title} className="pw-card p-6">
                  <span className="font-display text-3xl font-bold text-moss-500">{i + 1}</span>
                  <h3 className="mt-2 text-lg font-bold">{step.title}</h3>
                  <p className="mt-2 text-sm text-ink-soft">{step.body}</p>
                </li>
              ))}
            </ol>
            <p className="mt-10 max-w-3xl text-sm text-ink-soft">
              Underneath: standardised features, four covariance structures, k-means++ seeding with several restarts,
              regularised expectation–maximisation in log space, model choice by information criteria, immutable
              versions, allowed host origins, metering and a support team that can pause misuse.
            </p>
          </div>
        </section>

        <section id="pricing" className="py-20">
          <div className="mx-auto max-w-6xl px-6">
            <h2 className="text-3xl font-bold">Plans</h2>
            <p className="mt-3 max-w-2xl text-ink-soft">Start free. Move up when your calculators get busy. Prices are per workspace per month.</p>
            <PricingTable />
          </div>
        </section>

        <section className="mx-auto max-w-6xl px-6 pb-16">
          <div className="rounded-card border border-saffron-300 bg-saffron-100/50 p-6 text-sm text-ink-soft">
            <strong className="text-ink">A word on what the numbers mean.</strong> Membership probabilities describe how similar a
            set of values is to the groups found in someone&apos;s data. They are not a diagnosis, a score or a decision. Where a
            calculator could affect people — health, credit, hiring — its publisher must follow local rules and licensed practice.
          </div>
        </section>
      </main>
      <footer className="border-t border-ink/10 py-8 text-center text-sm text-ink-faint">Partwise · Gaussian mixtures for people who measure things</footer>
    </>
  );
}
