import { Health, Me, SignInResponse, type SignInRequest } from '@shared/schemas/auth';
import { request } from './http';

export const signIn = (input: SignInRequest) => request('POST', '/api/auth/sign-in', { body: input, schema: SignInResponse, auth: false });
export const refresh = (refreshToken: string) => request('POST', '/api/auth/refresh', { body: { refreshToken }, schema: SignInResponse, auth: false });
export const signOut = () => request('POST', '/api/auth/sign-out', {});
export const me = () => request('GET', '/api/auth/me', { schema: Me });
export const health = (signal?: AbortSignal) => request('GET', '/api/health', { schema: Health, auth: false, ...(signal ? { signal } : {}) });
