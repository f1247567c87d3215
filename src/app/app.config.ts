import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { ApplicationConfig, ErrorHandler, inject, provideAppInitializer, provideBrowserGlobalErrorListeners, provideZonelessChangeDetection } from '@angular/core';
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
  ],
};
