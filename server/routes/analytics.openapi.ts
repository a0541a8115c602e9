/** OpenAPI descriptions of the agreement dashboards' routes (analytics.ts beside this file). */
import {
  analyticsFiltersSchema,
  boundariesResponseSchema,
  classDriftSchema,
  classifierDetailSchema,
  classifiersResponseSchema,
  evaluateResponseSchema,
  filterOptionsSchema,
  flagSchema,
  flagsResponseSchema,
  flagThresholdsSchema,
  flagUpdateSchema,
  myAgreementSchema,
  overviewSchema,
  pairDetailSchema,
  pairsResponseSchema,
  raterDriftSchema,
} from '../../shared/schemas/analytics';
import { apiErrorSchema } from '../../shared/schemas/common';
import type { RouteDoc } from '../openapi/registry';

const base = '/api/federations/:federation/analytics';
const everyone = { session: true, bearerScopes: ['read'] } as const;
const session = { session: true } as const;
const invalid = { 400: { description: 'A filter or the body is not valid (each field named)', schema: apiErrorSchema } };

const route = (doc: Omit<RouteDoc, 'tags' | 'params'> & { params?: Record<string, string> }): RouteDoc => ({
  tags: ['Agreement dashboards'],
  ...doc,
  params: { federation: 'The federation’s slug', ...doc.params },
});

export const analyticsRouteDocs: RouteDoc[] = [
  route({
    method: 'get',
    path: `${base}/filters`,
    summary: 'What the dashboards can be filtered by: seasons, events, categories, kinds',
    security: everyone,
    responses: { 200: { description: 'Filter options', schema: filterOptionsSchema } },
  }),
  route({
    method: 'get',
    path: `${base}/overview`,
    summary: 'Headline reliability (ordinal alpha, Fleiss’ kappa with bands), agreement, counts, alpha by quarter; open flags for leads',
    security: everyone,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Overview', schema: overviewSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/classifiers`,
    summary: 'Each classifier against the panel (leads)',
    security: session,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Classifiers', schema: classifiersResponseSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/classifiers/:code`,
    summary:
      'One classifier: confusion matrix with the panel, bias by quarter, boundaries, the change of level, points at stake, flags (leads; a classifier for their own code only)',
    security: session,
    params: { code: 'Classifier code' },
    query: analyticsFiltersSchema,
    responses: {
      200: { description: 'The classifier', schema: classifierDetailSchema },
      ...invalid,
      404: { description: 'No such classifier', schema: apiErrorSchema },
    },
  }),
  route({
    method: 'get',
    path: `${base}/me`,
    summary: 'The signed-in classifier’s own figures, with the federation’s spread without names',
    security: session,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Own figures', schema: myAgreementSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/pairs`,
    summary: 'Quadratically weighted kappa of every pair of classifiers; pairs under minShared are “too few” (leads)',
    security: session,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Pairs', schema: pairsResponseSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/pairs/:a/:b`,
    summary: 'One pair of classifiers: agreement and confusion matrix (leads)',
    security: session,
    params: { a: 'Classifier code', b: 'Classifier code' },
    query: analyticsFiltersSchema,
    responses: {
      200: { description: 'The pair', schema: pairDetailSchema },
      ...invalid,
      404: { description: 'No such classifier', schema: apiErrorSchema },
    },
  }),
  route({
    method: 'get',
    path: `${base}/boundaries`,
    summary: 'Split rate of each class boundary, overall and by quarter',
    security: everyone,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Boundaries', schema: boundariesResponseSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/drift/raters`,
    summary: 'Each classifier’s bias by quarter and the drift rule’s change of level (leads)',
    security: session,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Rater drift', schema: raterDriftSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/drift/classes`,
    summary:
      'Class transitions between successive assessments, share of reviews and protests that changed a class, classes by season (the list of changes for leads only)',
    security: everyone,
    query: analyticsFiltersSchema,
    responses: { 200: { description: 'Class drift', schema: classDriftSchema }, ...invalid },
  }),
  route({
    method: 'get',
    path: `${base}/flags`,
    summary: 'Calibration flags with their evidence and status (leads)',
    security: session,
    responses: { 200: { description: 'Flags', schema: flagsResponseSchema } },
  }),
  route({
    method: 'post',
    path: `${base}/flags/evaluate`,
    summary: 'Evaluate the calibration flags now (leads)',
    security: session,
    noBody: true,
    responses: { 200: { description: 'Counts', schema: evaluateResponseSchema } },
  }),
  route({
    method: 'patch',
    path: `${base}/flags/:id`,
    summary: 'Acknowledge a flag or close it with a note (leads)',
    security: session,
    params: { id: 'Flag id' },
    body: { schema: flagUpdateSchema },
    responses: {
      200: { description: 'The flag', schema: flagSchema },
      ...invalid,
      404: { description: 'No such flag', schema: apiErrorSchema },
      409: { description: 'A closed flag stays closed', schema: apiErrorSchema },
    },
  }),
  route({
    method: 'get',
    path: `${base}/flag-settings`,
    summary: 'Thresholds of the calibration flags (leads)',
    security: session,
    responses: { 200: { description: 'Thresholds', schema: flagThresholdsSchema } },
  }),
  route({
    method: 'put',
    path: `${base}/flag-settings`,
    summary: 'Change the thresholds (leads); the flags are re-evaluated at once',
    security: session,
    body: { schema: flagThresholdsSchema },
    responses: { 200: { description: 'Saved thresholds', schema: flagThresholdsSchema }, ...invalid },
  }),
];
