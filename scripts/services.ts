import { smtpFakeService } from '@/lib/fakes/smtp';
import { paymentsService } from '@/lib/fakes/payments/service';
/**
 * Local stand-ins for outside services (mail, payments) that `npm start` and
 * `npm test` run on loopback beside Partwise. Each entry starts one service and
 * returns the environment the app needs to reach it, plus a stop function.
 */
export interface RunningService {
  name: string;
  env: Record<string, string>;
  stop(): Promise<void>;
}

export interface ServiceSpec {
  name: string;
  start(opts: { dataDir: string; appUrl: string }): Promise<RunningService>;
}

// Later features register their fakes here (SMTP fake, payment-service fake).
export const SERVICES: ServiceSpec[] = [];
SERVICES.push(smtpFakeService);
SERVICES.push(paymentsService);

export async function startServices(opts: { dataDir: string; appUrl: string }): Promise<RunningService[]> {
  const running: RunningService[] = [];
  for (const spec of SERVICES) running.push(await spec.start(opts));
  return running;
}

export async function stopServices(running: RunningService[]) {
  for (const s of [...running].reverse()) await s.stop().catch(() => undefined);
}
