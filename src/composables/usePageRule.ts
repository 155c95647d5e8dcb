/**
 * A page's own `@page` rule while it is shown: `@page` cannot be scoped to a component, so the
 * rule goes into <head> and leaves with the page (other pages print on the browser's default paper).
 */
import { onBeforeUnmount, watchEffect, type Ref } from 'vue';

export function usePageRule(rule: Ref<string>): void {
  const style = document.createElement('style');
  style.dataset.pageRule = '';
  document.head.append(style);
  watchEffect(() => {
    style.textContent = rule.value;
  });
  onBeforeUnmount(() => style.remove());
}
