export { searchCalculators, searchTerm, type CalculatorRow, type CalculatorPage } from './search';
export { calculatorDetail, dailyAnswers, embedAuditTrail, USAGE_DAYS, type CalculatorDetail, type AuditRow } from './detail';
export { disableEmbed, enableEmbed, suspendWorkspace, restoreWorkspace, clearFlag, setReportStatus, type StaffActing } from './actions';
export { sweepForSpikes, spikeRules, isSpike, usualHourlyRate, BASELINE_HOURS, type SpikeRules, type SpikeVerdict } from './spikes';
export { searchAudit, type AuditPage } from './audit-log';
export { startSupportTimers } from './timers';
export { noticeText, notifyOwners } from './notify';
export * from './schemas';
