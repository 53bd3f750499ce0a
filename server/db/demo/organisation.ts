/**
 * The invented demo scenario. Everything here is fictional: the utility,
 * its places and its people. Addresses use example.com.
 */
export const DEMO_UTILITY = {
  name: 'Harrowmere Valley Utility Cooperative',
  shortName: 'Harrowmere Valley',
  region: 'the Harrowmere valley',
};

export const DEMO_PASSWORD = 'rholog-demo';

export const DEMO_USERS = [
  { email: 'tech@example.com', name: 'Ines Ravelo', role: 'technician', phone: '+1 555 0101' },
  { email: 'tech2@example.com', name: 'Tomas Ekwueme', role: 'technician', phone: '+1 555 0102' },
  { email: 'supervisor@example.com', name: 'Maren Holt', role: 'supervisor', phone: '+1 555 0110' },
  { email: 'planner@example.com', name: 'Priya Castellanos', role: 'planner', phone: null },
  { email: 'admin@example.com', name: 'Dov Achterberg', role: 'admin', phone: null },
] as const;
