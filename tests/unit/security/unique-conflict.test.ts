import express from 'express';
import { DataTypes, Sequelize } from 'sequelize';
import request from 'supertest';
import { afterAll, describe, expect, it } from 'vitest';
import { errorHandler } from '../../../server/errors';

// A real unique index on a real (in-memory SQLite) table: the second insert of the same name is refused
// by the database, as when two people add the same thing at once and both passed the check before it.
const sequelize = new Sequelize('sqlite::memory:', { logging: false });
const Place = sequelize.define(
  'place',
  { siteName: { type: DataTypes.STRING, allowNull: false, field: 'site_name', unique: true } },
  { underscored: true },
);

const app = express();
app.use(express.json());
app.post('/places', async (req, res, next) => {
  try {
    res.status(201).json(await Place.create({ siteName: req.body.siteName }));
  } catch (err) {
    next(err);
  }
});
app.use(errorHandler({ exposeInternals: false }));

afterAll(() => sequelize.close());

describe('a unique index that refuses a second insert', () => {
  it('answers 409 naming the field, not 500, and stores nothing more', async () => {
    await Place.sync();
    expect((await request(app).post('/places').send({ siteName: 'Depot 4' })).status).toBe(201);
    const again = await request(app).post('/places').send({ siteName: 'Depot 4' });
    expect(again.status).toBe(409);
    expect(again.body.error.code).toBe('already_exists');
    expect(again.body.error.message).toBe('Another record already has the same siteName; nothing was changed. Reload to see it.');
    expect(again.body.error.fields).toEqual([{ field: 'siteName', message: 'is already used by another record' }]);
    expect(await Place.count()).toBe(1);
  });
});
