import { Router } from 'express';
import type { Knex } from 'knex';
import { allow } from '../middleware/auth';

export function usersRouter(db: Knex): Router {
  const router = Router();
  router.get('/users', allow('admin'), async (_req, res) => {
    const users = await db('users').orderBy('email').select('id', 'email', 'name', 'role', 'active', 'created_at as createdAt');
    res.json({ users });
  });
  return router;
}
