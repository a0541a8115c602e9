import { Router, type Request } from 'express';
import { z } from 'zod';
import { answerInputSchema, closeFlagInputSchema, exerciseInputSchema, proposalQuerySchema } from '../../shared/schemas/exercises';
import { accessOf, requireAccess } from '../auth/access';
import type { AppContext } from '../context';
import { HttpError } from '../http/errors';
import { parseWith } from '../http/validate';
import {
  closeExercise,
  closeFlagWithExercise,
  createExercise,
  exerciseDetail,
  listExercises,
  openExercise,
  proposeExercise,
  saveAnswer,
  updateDraft,
} from '../services/exercises';

/**
 * Calibration exercises: /api/federations/:federation/exercises/…
 *
 * Who may do what (enforced here, whatever the client shows; docs/decisions/0010-calibration-exercises.md):
 * - lead: every exercise, creates and edits drafts, opens and closes them, sees everything;
 * - classifier: the exercises assigned to them once open; answers while open; before the close
 *   no reference class and no one's answers but their own; after it, their own scores;
 * - researcher and API tokens: no exercise route at all.
 */
const base = '/federations/:federation/exercises';

function idOf(req: Request, name: 'id' | 'caseId' | 'flagId'): number {
  const raw = req.params[name];
  const parsed = z.coerce.number().int().positive().safeParse(raw);
  if (!parsed.success)
    throw new HttpError(
      400,
      'validation_failed',
      `The ${name === 'id' ? 'exercise' : name === 'caseId' ? 'case' : 'flag'} id "${String(raw)}" is not a number`,
    );
  return parsed.data;
}

/** The clock of the request path (the scheduler and tests pass their own to the service). */
const now = () => new Date();

export function exercisesRouter(ctx: AppContext): Router {
  const router = Router();
  const leadOnly = requireAccess(ctx, { roles: ['lead'] });
  const leadOrClassifier = requireAccess(ctx, { roles: ['lead', 'classifier'] });
  const classifierOnly = requireAccess(ctx, { roles: ['classifier'] });

  router.get(base, leadOrClassifier, async (req, res) => {
    res.json(await listExercises(ctx, accessOf(req)));
  });

  router.post(base, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const input = parseWith(exerciseInputSchema, req.body, 'exercise');
    const id = await createExercise(ctx, access.federation, access.userId, input);
    res.status(201).json(await exerciseDetail(ctx, access, id));
  });

  router.get(`${base}/proposal`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const query = parseWith(proposalQuerySchema, req.query, 'proposal query');
    res.json(await proposeExercise(ctx, access.federation, query));
  });

  router.get(`${base}/:id`, leadOrClassifier, async (req, res) => {
    res.json(await exerciseDetail(ctx, accessOf(req), idOf(req, 'id')));
  });

  router.put(`${base}/:id`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const id = idOf(req, 'id');
    const input = parseWith(exerciseInputSchema, req.body, 'exercise');
    await updateDraft(ctx, access.federation, id, access.userId, input);
    res.json(await exerciseDetail(ctx, access, id));
  });

  router.post(`${base}/:id/open`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const id = idOf(req, 'id');
    await openExercise(ctx, access.federation, id, access.userId, now());
    res.json(await exerciseDetail(ctx, access, id));
  });

  router.post(`${base}/:id/close`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const id = idOf(req, 'id');
    await closeExercise(ctx, access.federation.id, id, access.userId, now());
    res.json(await exerciseDetail(ctx, access, id));
  });

  router.put(`${base}/:id/answers/:caseId`, classifierOnly, async (req, res) => {
    const access = accessOf(req);
    const answer = parseWith(answerInputSchema, req.body, 'answer');
    res.json(await saveAnswer(ctx, access, idOf(req, 'id'), idOf(req, 'caseId'), answer, now()));
  });

  router.post(`${base}/:id/flags/:flagId/close`, leadOnly, async (req, res) => {
    const access = accessOf(req);
    const body = parseWith(closeFlagInputSchema, req.body);
    res.json(await closeFlagWithExercise(ctx, access.federation, idOf(req, 'id'), idOf(req, 'flagId'), access.userId, body.note));
  });

  return router;
}
