import { laterScreen } from '../../components/later-screens';

/** Turnaround figures: the screen is in components/screens, the chunk of every screen after the first. */
export default laterScreen('turnaround');
