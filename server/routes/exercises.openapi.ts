/** OpenAPI descriptions of the calibration exercises' routes (exercises.ts beside this file). */
import { flagSchema } from '../../shared/schemas/analytics';
import { apiErrorSchema } from '../../shared/schemas/common';
import {
  answerInputSchema,
  answerSavedSchema,
  closeFlagInputSchema,
  exerciseDetailSchema,
  exerciseInputSchema,
  exerciseListSchema,
  exerciseProposalSchema,
  proposalQuerySchema,
} from '../../shared/schemas/exercises';
import type { RouteDoc } from '../openapi/registry';

const base = '/api/federations/:federation/exercises';
const session = { session: true } as const;
const invalid = { 400: { description: 'The body, query or an id is not valid (each field named)', schema: apiErrorSchema } };
const missing = {
  404: { description: 'No such exercise for this caller (a classifier sees only those assigned, once open)', schema: apiErrorSchema },
};
const conflict = (description: string) => ({ 409: { description, schema: apiErrorSchema } });

const route = (doc: Omit<RouteDoc, 'tags' | 'params'> & { params?: Record<string, string> }): RouteDoc => ({
  tags: ['Calibration exercises'],
  ...doc,
  params: { federation: 'The federation’s slug', id: 'Exercise id', ...doc.params },
});

export const exercisesRouteDocs: RouteDoc[] = [
  route({
    method: 'get',
    path: base,
    summary: 'The caller’s exercises: every one for a lead, those assigned (open or closed) for a classifier',
    security: session,
    responses: { 200: { description: 'Exercises with id, status and progress', schema: exerciseListSchema } },
  }),
  route({
    method: 'post',
    path: base,
    summary: 'Create a draft exercise: cases with reference classes, classifiers, open and close dates (leads)',
    security: session,
    body: { schema: exerciseInputSchema },
    responses: { 201: { description: 'The draft', schema: exerciseDetailSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/proposal`,
    summary: 'A draft to start from a calibration flag or a class boundary: cases where panels split there, and the classifiers (leads)',
    security: session,
    query: proposalQuerySchema,
    responses: {
      200: { description: 'Proposed title, cases and classifiers', schema: exerciseProposalSchema },
      ...invalid,
      404: { description: 'No such flag', schema: apiErrorSchema },
    },
  }),
  route({
    method: 'get',
    path: `${base}/:id`,
    summary: 'One exercise. Before the close a classifier gets no reference class and only their own answers; after it, their own scores',
    security: session,
    responses: { 200: { description: 'The exercise', schema: exerciseDetailSchema }, ...invalid, ...missing },
  }),
  route({
    method: 'put',
    path: `${base}/:id`,
    summary: 'Replace a draft’s title, dates, cases and classifiers (leads)',
    security: session,
    body: { schema: exerciseInputSchema },
    responses: {
      200: { description: 'The draft', schema: exerciseDetailSchema },
      ...invalid,
      ...missing,
      ...conflict('Only a draft can be edited'),
    },
  }),
  route({
    method: 'post',
    path: `${base}/:id/open`,
    summary: 'Open a draft: invitations go to the classifiers assigned (leads)',
    security: session,
    noBody: true,
    responses: {
      200: { description: 'The open exercise', schema: exerciseDetailSchema },
      ...invalid,
      ...missing,
      ...conflict('Not a draft, or its close date has passed'),
    },
  }),
  route({
    method: 'post',
    path: `${base}/:id/close`,
    summary: 'Close an open exercise now: scores are computed and the classifiers told that results are out (leads)',
    security: session,
    noBody: true,
    responses: {
      200: { description: 'The closed exercise with its results', schema: exerciseDetailSchema },
      ...invalid,
      ...missing,
      ...conflict('Not open'),
    },
  }),
  route({
    method: 'put',
    path: `${base}/:id/answers/:caseId`,
    summary: 'Save or change the caller’s answer to one case while the exercise is open (classifiers assigned)',
    security: session,
    params: { caseId: 'Case id' },
    body: { schema: answerInputSchema },
    responses: {
      200: { description: 'The saved answer and the caller’s progress', schema: answerSavedSchema },
      ...invalid,
      ...missing,
      ...conflict('The exercise has closed'),
    },
  }),
  route({
    method: 'post',
    path: `${base}/:id/flags/:flagId/close`,
    summary: 'Close a calibration flag with a note and a link to this (closed) exercise (leads)',
    security: session,
    params: { flagId: 'Calibration flag id' },
    body: { schema: closeFlagInputSchema },
    responses: {
      200: { description: 'The closed flag', schema: flagSchema },
      ...invalid,
      ...missing,
      ...conflict('The exercise is not closed yet'),
    },
  }),
];
