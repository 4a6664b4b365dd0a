/** The main sections of the app, in the order the navigation shows them. */
export const mainSections = [
  { name: 'jobs', label: 'Jobs', icon: 'assignment' },
  { name: 'fleet', label: 'Fleet', icon: 'precision_manufacturing' },
  { name: 'records', label: 'Records', icon: 'fact_check' },
  { name: 'people', label: 'People', icon: 'groups', admin: true },
] as const;
