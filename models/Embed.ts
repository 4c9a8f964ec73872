import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export const EMBED_STATUSES = ['active', 'disabled', 'retired'] as const;
export type EmbedStatus = (typeof EMBED_STATUSES)[number];

/** A published calculator: an unguessable token pointing at one of its versions. */
export class Embed extends Model<InferAttributes<Embed>, InferCreationAttributes<Embed>> {
  declare id: CreationOptional<number>;
  declare workspaceId: ForeignKey<number>;
  declare mixtureModelId: ForeignKey<number | null>;
  declare token: string;
  declare title: string;
  declare activeVersionId: ForeignKey<number | null>;
  declare status: CreationOptional<EmbedStatus>;
  declare allowedOrigins: CreationOptional<string[]>;
  declare theme: CreationOptional<'light' | 'dark'>;
  declare accentColor: CreationOptional<string>;
  /** The calculator's language for its fixed texts: 'auto' (the visitor's browser) or en, de, fr, es. */
  declare language: CreationOptional<string>;
  /** Typicality percentile below which visitors see the "unlike the data" notice. */
  declare typicalityThreshold: CreationOptional<number>;
  declare disabledReason: CreationOptional<string | null>;
  declare disabledAt: CreationOptional<Date | null>;
  /** Set when answers in an hour jump far above the usual rate; for staff review. */
  declare flaggedAt: CreationOptional<Date | null>;
  /** Answer insight counts this calculator's answers (lib/insight); the publisher may switch it off. */
  declare insightEnabled: CreationOptional<boolean>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    Embed.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        workspaceId: { type: DataTypes.INTEGER, allowNull: false },
        mixtureModelId: { type: DataTypes.INTEGER, allowNull: true },
        token: { type: DataTypes.STRING(64), allowNull: false, unique: true },
        title: { type: DataTypes.STRING(200), allowNull: false },
        activeVersionId: { type: DataTypes.INTEGER, allowNull: true },
        status: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'active' },
        allowedOrigins: { type: DataTypes.JSON, allowNull: false, defaultValue: [] },
        theme: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'light' },
        accentColor: { type: DataTypes.STRING(9), allowNull: false, defaultValue: '#2f6f5e' },
        language: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'auto' },
        typicalityThreshold: { type: DataTypes.FLOAT, allowNull: false, defaultValue: 1 },
        disabledReason: { type: DataTypes.TEXT, allowNull: true },
        disabledAt: { type: DataTypes.DATE, allowNull: true },
        flaggedAt: { type: DataTypes.DATE, allowNull: true },
        insightEnabled: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'embeds', modelName: 'Embed' },
    );
  }
}
