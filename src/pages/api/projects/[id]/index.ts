import { allow } from '../../../../lib/api/http';
import { deleteProject, getProject, updateProject } from '../../../../lib/api/projects';

export const GET = getProject;
export const PATCH = updateProject;
export const DELETE = deleteProject;
export const ALL = allow('GET', 'PATCH', 'DELETE');
