import { Routes } from '@angular/router';
import { signedOutGuard } from '../core/auth-guards';

export const AUTH_ROUTES: Routes = [
  {
    path: 'sign-in',
    title: 'Sign in · Noisewright',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./sign-in/sign-in').then((m) => m.SignIn),
  },
  {
    path: 'sign-up',
    title: 'Create account · Noisewright',
    canActivate: [signedOutGuard],
    loadComponent: () => import('./sign-up/sign-up').then((m) => m.SignUp),
  },
  {
    path: 'forgot-password',
    title: 'Forgot password · Noisewright',
    loadComponent: () => import('./forgot-password/forgot-password').then((m) => m.ForgotPassword),
  },
  {
    path: 'reset-password/:token',
    title: 'New password · Noisewright',
    loadComponent: () => import('./reset-password/reset-password').then((m) => m.ResetPassword),
  },
];
