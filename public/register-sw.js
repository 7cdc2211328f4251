// Registers the service worker that keeps the app working with no signal.
if ('serviceWorker' in navigator) {
  window.addEventListener('load', () => {
    navigator.serviceWorker.register('./sw.js').catch((err) => {
      console.warn('offline support unavailable:', err);
    });
  });
}
