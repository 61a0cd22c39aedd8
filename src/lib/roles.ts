// The four staff roles (DESIGN.md §2). Shared by the server's authorisation table and the client's labels.
export const roles = ['writer', 'lead', 'tech', 'manager'] as const;
export type Role = (typeof roles)[number];

export const roleLabels: Record<Role, string> = {
	writer: 'Service writer',
	lead: 'Floor lead',
	tech: 'Technician',
	manager: 'Manager'
};
