import { DataTypes, Model, type CreationOptional, type ForeignKey, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class AbuseReport extends Model<InferAttributes<AbuseReport>, InferCreationAttributes<AbuseReport>> {
  declare id: CreationOptional<number>;
  declare embedId: ForeignKey<number>;
  declare reason: string;
  declare message: string;
  declare reporterEmail: CreationOptional<string | null>;
  declare reporterAddress: CreationOptional<string | null>;
  declare hostOrigin: CreationOptional<string | null>;
  declare status: CreationOptional<'open' | 'closed'>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    AbuseReport.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        embedId: { type: DataTypes.INTEGER, allowNull: false },
        reason: { type: DataTypes.STRING(32), allowNull: false },
        message: { type: DataTypes.TEXT, allowNull: false },
        reporterEmail: { type: DataTypes.STRING(320), allowNull: true },
        reporterAddress: { type: DataTypes.STRING(64), allowNull: true },
        hostOrigin: { type: DataTypes.STRING(255), allowNull: true },
        status: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'open' },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'abuse_reports', modelName: 'AbuseReport' },
    );
  }
}
