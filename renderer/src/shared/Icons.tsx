// Icons drawn rather than typed: symbols such as the no-entry sign are missing from many fonts
// and show as an empty box there. Decorative: the word beside each icon says the same.
export function StopIcon() {
  return (
    <svg className="icon icon-stop" viewBox="0 0 16 16" width="1em" height="1em" aria-hidden="true">
      <polygon points="5,1 11,1 15,5 15,11 11,15 5,15 1,11 1,5" fill="currentColor" />
      <rect x="4" y="7" width="8" height="2" fill="#fff" />
    </svg>
  );
}
