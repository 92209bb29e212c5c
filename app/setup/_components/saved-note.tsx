import styles from './form.module.css';

/** The note after a save ("Saved."), read out once. */
export function SavedNote({ saved, what }: { saved: string | undefined; what: string }) {
  if (saved !== 'created' && saved !== 'updated') return null;
  return (
    <p className={styles.saved} role="status">
      {what} {saved === 'created' ? 'added' : 'saved'}.
    </p>
  );
}
