import { allow } from '../../../lib/api/http';
import { createProject, listProjects } from '../../../lib/api/projects';

export const GET = listProjects;
export const POST = createProject;
export const ALL = allow('GET', 'POST');
