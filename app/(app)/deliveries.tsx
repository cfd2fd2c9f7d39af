import { laterScreen } from '../../components/later-screens';

/** EHR delivery: the screen is in components/screens, the chunk of every screen after the first. */
export default laterScreen('deliveries');
