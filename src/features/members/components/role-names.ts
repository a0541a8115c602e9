export const ROLE_NAMES = { lead: 'Classification lead', classifier: 'Classifier', researcher: 'Researcher' } as const;
