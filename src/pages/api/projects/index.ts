import { createProject, listProjects } from '../../../lib/api/projects';

export const GET = listProjects;
export const POST = createProject;
