import { laterScreen } from '../../../../components/later-screens';

/** A study's setup section: the screen is in components/screens, the chunk of every screen after the first. */
export default laterScreen('studySetup');
