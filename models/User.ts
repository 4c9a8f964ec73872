import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize';

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>;
  declare email: string;
  declare name: string;
  declare passwordHash: string;
  declare emailVerifiedAt: CreationOptional<Date | null>;
  /** Partwise support staff; created only from the command line. */
  declare isStaff: CreationOptional<boolean>;
  /** Sessions signed in under an older generation are refused (lib/auth/sessions.ts). */
  declare sessionGeneration: CreationOptional<number>;
  declare createdAt: CreationOptional<Date>;
  declare updatedAt: CreationOptional<Date>;

  static initModel(sequelize: Sequelize) {
    User.init(
      {
        id: { type: DataTypes.INTEGER, autoIncrement: true, primaryKey: true },
        email: { type: DataTypes.STRING(320), allowNull: false, unique: true },
        name: { type: DataTypes.STRING(120), allowNull: false, defaultValue: '' },
        passwordHash: { type: DataTypes.STRING(100), allowNull: false },
        emailVerifiedAt: { type: DataTypes.DATE, allowNull: true },
        isStaff: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
        sessionGeneration: { type: DataTypes.INTEGER, allowNull: false, defaultValue: 0 },
        createdAt: DataTypes.DATE,
        updatedAt: DataTypes.DATE,
      },
      { sequelize, tableName: 'users', modelName: 'User' },
    );
  }
}
