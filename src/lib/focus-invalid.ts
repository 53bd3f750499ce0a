/**
 * After a form is sent with fields it cannot take, the first such field gets
 * the focus and is brought to the middle of the screen. On a phone the send
 * button is often a screen or two below the field that needs fixing: without
 * this the tap seemed to do nothing. Fields say they are wrong with
 * aria-invalid (see components/ui/field), so every form is covered.
 */
export function installFocusFirstInvalid(doc: Document): () => void {
  const onSubmit = (e: Event) => {
    const form = e.target;
    if (!(form instanceof HTMLFormElement)) return;
    // React has drawn the form's errors by the next task.
    setTimeout(() => {
      const first = form.querySelector<HTMLElement>('[aria-invalid="true"]');
      if (
        !first ||
        (doc.activeElement && doc.activeElement.getAttribute('aria-invalid') === 'true' && form.contains(doc.activeElement))
      )
        return;
      first.focus({ preventScroll: true });
      first.scrollIntoView?.({ block: 'center' });
    }, 0);
  };
  doc.addEventListener('submit', onSubmit);
  return () => doc.removeEventListener('submit', onSubmit);
}
