import { deleteProject, getProject, updateProject } from '../../../../lib/api/projects';

export const GET = getProject;
export const PATCH = updateProject;
export const DELETE = deleteProject;
