import { QueryTypes } from 'sequelize';
import { PLANS, PLAN_IDS, type Plan, type PlanId } from '@/lib/plans';
import { monthPeriod, workspaceMonthlyAnswers } from '@/lib/usage';
import { AppError } from '@/lib/errors';
import { Invoice, Membership, Subscription, sequelize } from '@/models';
import type { InvoiceLine } from '@/models/Invoice';
import { allowanceState, countLiveCalculators, pauseThreshold, workspacePlan, type AllowanceState } from './limits';

/**
 * What the billing page and the usage route show: the plan in force, the
 * subscription's state, this month's usage against every limit, and invoices.
 */
export interface UsageMeter {
  key: 'answers' | 'calculators' | 'seats' | 'datasetRows' | 'uploadBytes';
  label: string;
  used: number;
  limit: number;
  unit: 'count' | 'bytes';
  /** What `used` measures, in a few words. */
  note: string;
}

export interface BillingSummary {
  plan: Pick<Plan, 'id' | 'name' | 'monthlyPrice' | 'limits'>;
  subscription: {
    status: string;
    /** The plan the payment service has on record (may differ from `plan` while it is not in force). */
    recordedPlan: string;
    paid: boolean;
    cancelAtPeriodEnd: boolean;
    currentPeriodEnd: string | null;
  };
  period: string;
  answers: { state: AllowanceState; pauseAt: number };
  usage: UsageMeter[];
  plans: { id: PlanId; name: string; monthlyPrice: number; limits: Plan['limits'] }[];
  /** Credit on account in cents (≥ 0): what earlier changes left, used first on the next invoices. */
  credit: number;
}

export async function usageMeters(workspaceId: number, plan: Plan, period = monthPeriod()): Promise<UsageMeter[]> {
  const [answers, calculators, seats, largest] = await Promise.all([
    workspaceMonthlyAnswers(workspaceId, period),
    countLiveCalculators(workspaceId),
    Membership.count({ where: { workspaceId } }),
    sequelize.query<{ max_rows: number | null; max_bytes: number | null }>('SELECT MAX(row_count) AS max_rows, MAX(LENGTH(original_csv)) AS max_bytes FROM datasets WHERE workspace_id = ?', {
      replacements: [workspaceId],
      type: QueryTypes.SELECT,
    }),
  ]);
  const l = plan.limits;
  return [
    { key: 'answers', label: 'Scored answers this month', used: answers, limit: l.answersPerMonth, unit: 'count', note: `all calculators, ${period}` },
    { key: 'calculators', label: 'Published calculators', used: calculators, limit: l.calculators, unit: 'count', note: 'live or disabled, not retired' },
    { key: 'seats', label: 'Seats', used: seats, limit: l.seats, unit: 'count', note: 'people in the workspace' },
    { key: 'datasetRows', label: 'Rows in the largest dataset', used: Number(largest[0]?.max_rows ?? 0), limit: l.datasetRows, unit: 'count', note: 'limit applies per upload' },
    { key: 'uploadBytes', label: 'Largest upload', used: Number(largest[0]?.max_bytes ?? 0), limit: l.uploadBytes, unit: 'bytes', note: 'limit applies per file' },
  ];
}

export async function billingSummary(workspaceId: number, period = monthPeriod()): Promise<BillingSummary> {
  const [plan, row, latest] = await Promise.all([
    workspacePlan(workspaceId),
    Subscription.findOne({ where: { workspaceId } }),
    // Every change of the balance comes with an invoice, so the newest one's ending balance is the balance now.
    Invoice.findOne({ where: { workspaceId }, order: [['createdAt', 'DESC'], ['id', 'DESC']], attributes: ['endingBalance'] }),
  ]);
  const usage = await usageMeters(workspaceId, plan, period);
  const answers = usage[0];
  return {
    plan: { id: plan.id, name: plan.name, monthlyPrice: plan.monthlyPrice, limits: plan.limits },
    subscription: {
      status: row?.status ?? 'active',
      recordedPlan: row?.plan ?? plan.id,
      paid: plan.monthlyPrice > 0 && !!row?.subscriptionRef,
      cancelAtPeriodEnd: !!row?.cancelAtPeriodEnd,
      currentPeriodEnd: row?.currentPeriodEnd?.toISOString() ?? null,
    },
    period,
    answers: { state: allowanceState(answers.used, answers.limit), pauseAt: pauseThreshold(answers.limit) },
    usage,
    plans: PLAN_IDS.map((id) => ({ id, name: PLANS[id].name, monthlyPrice: PLANS[id].monthlyPrice, limits: PLANS[id].limits })),
    credit: Math.max(0, -(latest?.endingBalance ?? 0)),
  };
}

export interface InvoiceView {
  id: number;
  number: string | null;
  amountDue: number;
  amountPaid: number;
  currency: string;
  status: string;
  periodStart: string | null;
  periodEnd: string | null;
  paidAt: string | null;
  createdAt: string;
  subtotal: number | null;
  startingBalance: number;
  endingBalance: number;
}

export interface InvoiceDetail extends InvoiceView {
  lines: InvoiceLine[];
  /** Credit taken from the balance by this invoice (≥ 0). */
  creditUsed: number;
  /** Credit this invoice added to the balance (≥ 0), e.g. a downgrade's unused time. */
  creditAdded: number;
}

function invoiceView(r: Invoice): InvoiceView {
  return {
    id: r.id,
    number: r.number,
    amountDue: r.amountDue,
    amountPaid: r.amountPaid,
    currency: r.currency,
    status: r.status,
    periodStart: r.periodStart?.toISOString() ?? null,
    periodEnd: r.periodEnd?.toISOString() ?? null,
    paidAt: r.paidAt?.toISOString() ?? null,
    createdAt: r.createdAt.toISOString(),
    subtotal: r.subtotal,
    startingBalance: r.startingBalance,
    endingBalance: r.endingBalance,
  };
}

/** One invoice of the workspace with its lines; another workspace's id is simply not found. */
export async function findInvoice(workspaceId: number, id: number): Promise<InvoiceDetail> {
  const row = await Invoice.findOne({ where: { id, workspaceId } });
  if (!row) throw new AppError('not_found', 'There is no such invoice in this workspace.');
  const lines = (typeof row.lines === 'string' ? JSON.parse(row.lines) : row.lines) as InvoiceLine[];
  const before = Math.max(0, -row.startingBalance);
  const after = Math.max(0, -row.endingBalance);
  return { ...invoiceView(row), lines: Array.isArray(lines) ? lines : [], creditUsed: Math.max(0, before - after), creditAdded: Math.max(0, after - before) };
}

export async function listInvoices(workspaceId: number, limit = 50): Promise<InvoiceView[]> {
  const rows = await Invoice.findAll({ where: { workspaceId }, order: [['createdAt', 'DESC'], ['id', 'DESC']], limit });
  return rows.map(invoiceView);
}
