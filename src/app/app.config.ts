import { provideHttpClient, withInterceptors } from '@angular/common/http';
import {
  ApplicationConfig,
  ErrorHandler,
  inject,
  isDevMode,
  provideAppInitializer,
  provideBrowserGlobalErrorListeners,
  provideZonelessChangeDetection,
} from '@angular/core';
import { provideServiceWorker } from '@angular/service-worker';
import { provideRouter, withComponentInputBinding, withNavigationErrorHandler } from '@angular/router';
import { routes } from './app.routes';
import { authInterceptor } from './core/auth.interceptor';
import { AuthService } from './core/auth.service';
import { ChunkReloadErrorHandler, navigationChunkErrorHandler } from './core/chunk-reload';

export const appConfig: ApplicationConfig = {
  providers: [
    provideBrowserGlobalErrorListeners(),
    provideZonelessChangeDetection(),
    provideRouter(routes, withComponentInputBinding(), withNavigationErrorHandler(navigationChunkErrorHandler)),
    { provide: ErrorHandler, useClass: ChunkReloadErrorHandler },
    provideHttpClient(withInterceptors([authInterceptor])),
    // who is signed in (the session is an httpOnly cookie), known before the first navigation's guards run
    provideAppInitializer(() => inject(AuthService).restore()),
    // the production build's service worker (ngsw-config.json): the app and the technician's data work offline
    provideServiceWorker('ngsw-worker.js', { enabled: !isDevMode(), registrationStrategy: 'registerWhenStable:5000' }),
  ],
};
