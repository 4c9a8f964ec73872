import { getSequelize } from './db';
import { User } from './User';
import { Workspace } from './Workspace';
import { Membership } from './Membership';
import { Invitation } from './Invitation';
import { AuthToken } from './AuthToken';
import { Dataset } from './Dataset';
import { Fit } from './Fit';
import { MixtureModel } from './MixtureModel';
import { ModelVersion } from './ModelVersion';
import { Embed } from './Embed';
import { UsageCounter } from './UsageCounter';
import { Subscription } from './Subscription';
import { Invoice } from './Invoice';
import { AbuseReport } from './AbuseReport';
import { AuditEvent } from './AuditEvent';
import { MailMessage } from './MailMessage';
import { WebhookEvent } from './WebhookEvent';
import { InsightBins } from './InsightBins';
import { InsightCount } from './InsightCount';
import { InsightAlert } from './InsightAlert';
import { ApiKey } from './ApiKey';

export const sequelize = getSequelize();

const all = [User, Workspace, Membership, Invitation, AuthToken, Dataset, Fit, MixtureModel, ModelVersion, Embed, UsageCounter, Subscription, Invoice, AbuseReport, AuditEvent, MailMessage, WebhookEvent, InsightBins, InsightCount, InsightAlert, ApiKey];

// A model class binds to one Sequelize instance; initialise once per process.
if (!User.sequelize) {
  for (const model of all) model.initModel(sequelize);

  User.hasMany(Membership, { foreignKey: 'userId' });
  Membership.belongsTo(User, { foreignKey: 'userId' });
  Workspace.hasMany(Membership, { foreignKey: 'workspaceId' });
  Membership.belongsTo(Workspace, { foreignKey: 'workspaceId' });
  Workspace.hasMany(Invitation, { foreignKey: 'workspaceId' });
  Invitation.belongsTo(Workspace, { foreignKey: 'workspaceId' });
  User.hasMany(AuthToken, { foreignKey: 'userId' });
  Workspace.hasMany(Dataset, { foreignKey: 'workspaceId' });
  Dataset.belongsTo(Workspace, { foreignKey: 'workspaceId' });
  Dataset.hasMany(Fit, { foreignKey: 'datasetId' });
  Fit.belongsTo(Dataset, { foreignKey: 'datasetId' });
  Workspace.hasMany(MixtureModel, { foreignKey: 'workspaceId' });
  MixtureModel.belongsTo(Fit, { foreignKey: 'fitId' });
  Workspace.hasMany(Embed, { foreignKey: 'workspaceId' });
  Embed.belongsTo(Workspace, { foreignKey: 'workspaceId' });
  Embed.belongsTo(MixtureModel, { foreignKey: 'mixtureModelId' });
  Embed.hasMany(ModelVersion, { foreignKey: 'embedId', as: 'versions' });
  ModelVersion.belongsTo(Embed, { foreignKey: 'embedId' });
  Embed.belongsTo(ModelVersion, { foreignKey: 'activeVersionId', as: 'activeVersion', constraints: false });
  Embed.hasMany(UsageCounter, { foreignKey: 'embedId' });
  Embed.hasMany(AbuseReport, { foreignKey: 'embedId' });
  AbuseReport.belongsTo(Embed, { foreignKey: 'embedId' });
  Workspace.hasOne(Subscription, { foreignKey: 'workspaceId' });
  Subscription.belongsTo(Workspace, { foreignKey: 'workspaceId' });
  Workspace.hasMany(Invoice, { foreignKey: 'workspaceId' });
  Workspace.hasMany(ApiKey, { foreignKey: 'workspaceId' });
  ApiKey.belongsTo(Workspace, { foreignKey: 'workspaceId' });
}

export { User, Workspace, Membership, Invitation, AuthToken, Dataset, Fit, MixtureModel, ModelVersion, Embed, UsageCounter, Subscription, Invoice, AbuseReport, AuditEvent, MailMessage, WebhookEvent, InsightBins, InsightCount, InsightAlert, ApiKey };
export type { ApiKeyScope } from './ApiKey';
export type { WorkspaceRole } from './Membership';
export type { DatasetColumn } from './Dataset';
export type { ClusterLabel, FieldSetting } from './MixtureModel';
export type { StoredFieldBins } from './InsightBins';
export type { InsightKind } from './InsightCount';
